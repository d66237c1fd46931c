#pragma once
// One exception hierarchy for everything stepcert rejects or cannot do.
// Every message says what was wrong and what to do about it.
#include <cstddef>
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

namespace stepcert {

/// Base of every exception stepcert throws.
class error : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

/// An argument is out of its domain (empty interval, h <= 0, ratio <= 1, ...).
class invalid_input : public error {
public:
    using error::error;
};

/// Where a run's first NaN or infinity came from, as a replay of the failing stretch measured it.
struct non_finite_site {
    enum class cause {
        right_hand_side,  ///< the right-hand side returned NaN or inf for a finite, moderate state
        state_growth,     ///< the state itself grew past the scalar type's range (or the model overflowed on it)
    };
    cause what = cause::state_growth;
    double time = 0.0;              ///< of the evaluation that first saw it (earliest, over trial steps)
    std::size_t component = 0;      ///< the first non-finite component there
    bool nan = true;                ///< NaN (true) or an infinity (false)
    double last_finite_time = 0.0;  ///< the last output time with a finite state
    double largest_finite = 0.0;    ///< largest |y_i| handed to the right-hand side before it failed
    /// States to judge the failure by (their times in state_times): the finite state the
    /// right-hand side failed on, or (state growth) the first and the last few handed to it while
    /// the state stayed within twice its size at the last finite output.
    std::vector<std::vector<double>> states;
    std::vector<double> state_times;
    std::size_t evaluations = 0;    ///< right-hand-side evaluations of the failed run (its replay not counted)
};

/// A state, a time or a right-hand-side value is NaN or infinite. Thrown by the run drivers with
/// the site of the failure when a replay could measure it.
class non_finite_value : public error {
public:
    using error::error;
    non_finite_value(const std::string& what, non_finite_site site)
        : error(what), site_(std::make_shared<const non_finite_site>(std::move(site))) {}

    /// The measured site of the failure, or null when none was measured.
    const non_finite_site* site() const { return site_.get(); }

private:
    std::shared_ptr<const non_finite_site> site_;  // shared: exceptions are copied
};

/// A loop hit its evaluation or step budget before finishing.
class budget_exhausted : public error {
public:
    using error::error;
};

/// The requested accuracy cannot be reached (reference digits, tolerance below round-off).
class accuracy_unreachable : public error {
public:
    using error::error;
};

/// The method itself cannot take a step where asked: an implicit method's iteration matrix is
/// singular, or its iteration does not converge. The message names the time and the step.
class method_failure : public error {
public:
    using error::error;
};

/// A problem or method lacks something the requested operation needs.
class unsupported_operation : public error {
public:
    using error::error;
};

} // namespace stepcert
