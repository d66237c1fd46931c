#pragma once
// What reference_solution returns and the knobs it takes.
#include <cstddef>
#include <string>
#include <vector>

#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

struct reference_options {
    /// Right-hand-side evaluations allowed over all runs (answer and checks). When they run
    /// out, reference_solution throws accuracy_unreachable saying so.
    std::size_t max_evaluations = 20'000'000;
    /// When the right-hand side accepts only double (or long double), the reference cannot
    /// carry many digits. By default it then returns what it can vouch for, with
    /// vouched_digits < requested_digits and the reason in `how`; false makes that an
    /// accuracy_unreachable instead.
    bool allow_fewer_digits_if_double_only = true;
};

template <class State>
struct reference_result {
    using state_type = State;
    using scalar_type = scalar_of<State>;

    std::vector<scalar_type> times;  ///< the requested output times
    std::vector<State> states;       ///< the reference states there
    /// Significant digits the self-check supports (definition in reference/agreement.hpp):
    /// at each time, every component is within 10^-vouched_digits * ||y(t)||_inf.
    double vouched_digits = 0.0;
    int requested_digits = 0;
    std::string how;  ///< the runs made, their tolerances and types, and why the digits hold
    run_stats cost;   ///< summed over all runs

    bool vouches_requested() const { return vouched_digits >= static_cast<double>(requested_digits); }
};

} // namespace stepcert
