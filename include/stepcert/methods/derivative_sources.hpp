#pragma once
// Where a linearly implicit or implicit method takes the derivatives of the right-hand side
// from when the problem gives none: tags that select central differences (each counted as
// right-hand-side evaluations by the run driver).

namespace stepcert {

/// The Jacobian ∂f/∂y by central differences of the right-hand side (2n evaluations each time),
/// step delta_j = eps^(1/3) max(1, |y_j|) (common practice, no source).
struct jacobian_by_differences {};
/// ∂f/∂t by a central difference in t (2 evaluations each time), step eps^(1/3) max(1, |t|);
/// exactly zero for a right-hand side that does not depend on t.
struct time_derivative_by_differences {};

} // namespace stepcert
