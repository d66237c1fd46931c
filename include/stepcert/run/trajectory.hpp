#pragma once
// The result of one run: the states at the output times and what the run cost.
#include <vector>

#include "stepcert/methods/method.hpp"

namespace stepcert {

template <class State>
struct trajectory {
    using state_type = State;
    using scalar_type = scalar_of<State>;
    std::vector<scalar_type> times;  ///< output times, t0 first
    std::vector<State> states;       ///< states at those times
    run_stats stats;

    const State& final_state() const { return states.back(); }
};

} // namespace stepcert
