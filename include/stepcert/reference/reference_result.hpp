#pragma once
// What reference_solution returns and the knobs it takes.
#include <cstddef>
#include <initializer_list>
#include <string>
#include <utility>
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

/// count evenly spaced output times t0 + j (t1 - t0) / count, j = 1..count (the last is t1
/// exactly), computed in the scalar type that asks for them, not in double.
struct uniform_times {
    std::size_t count = 1;

    template <class T>
    std::vector<T> in(const T& t0, const T& t1) const {
        std::vector<T> out;
        out.reserve(count);
        for (std::size_t j = 1; j <= count; ++j)
            out.push_back(j == count ? t1 : t0 + (t1 - t0) * static_cast<T>(j) / static_cast<T>(count));
        return out;
    }
};

/// The output times reference_solution is asked for: a list of times ({1.0, 5.0} or a
/// std::vector<double>; empty means t1 alone) or uniform_times{n}. One parameter type, so a
/// braced list of doubles is never mistaken for uniform_times.
class output_times {
public:
    output_times() = default;
    output_times(std::initializer_list<double> times) : list_(times) {}
    output_times(std::vector<double> times) : list_(std::move(times)) {}
    output_times(uniform_times grid) : uniform_(true), grid_(grid) {}

    bool is_uniform() const { return uniform_; }
    const std::vector<double>& list() const { return list_; }
    uniform_times grid() const { return grid_; }

private:
    std::vector<double> list_;
    bool uniform_ = false;
    uniform_times grid_{};
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
