// Bad input to a sweep: one test per rejected case, each with its exception type and a message
// that names what was wrong.
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/symplectic_rkn.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/sweep/cheapest_method.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"

namespace test_sweep_inputs {

using namespace stepcert;

template <class E, class F>
void expect_throw_saying(F&& f, const std::string& words) {
    try {
        f();
        ADD_FAILURE() << "nothing thrown; expected a message with '" << words << "'";
    } catch (const E& e) {
        EXPECT_NE(std::string(e.what()).find(words), std::string::npos) << e.what();
    } catch (const std::exception& e) {
        ADD_FAILURE() << "wrong exception type: " << e.what();
    }
}

sweep_options four_times() {
    sweep_options o;
    o.output_times = 4;
    o.threads = 1;
    return o;
}

auto oscillator_sweep() { return cost_accuracy_sweep(problems::harmonic_oscillator(), four_times()); }

} // namespace test_sweep_inputs

using namespace test_sweep_inputs;

TEST(SweepInputs, EmptyStepLadder) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>([&] { s.add_fixed_step(stepcert::classic_rk4, {}); }, "step-count ladder is empty");
}

TEST(SweepInputs, EmptyToleranceLadder) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>([&] { s.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{}); },
                                                 "tolerance ladder is empty");
}

TEST(SweepInputs, ZeroStepCount) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>([&] { s.add_fixed_step(stepcert::classic_rk4, {16, 0}); }, "is 0; give step counts >= 1");
}

TEST(SweepInputs, StepCountNotAMultipleOfTheOutputTimes) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>([&] { s.add_fixed_step(stepcert::classic_rk4, {16, 30}); },
                                                 "step count 30 is not a multiple of sweep_options::output_times = 4");
}

TEST(SweepInputs, NonPositiveTolerance) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>([&] { s.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{1e-6, -1e-8}); },
                                                 "tolerance 1 is -1e-08");
}

TEST(SweepInputs, NonFiniteTolerance) {
    auto s = oscillator_sweep();
    const double nan = std::numeric_limits<double>::quiet_NaN();
    expect_throw_saying<stepcert::invalid_input>([&] { s.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{nan}); },
                                                 "finite and > 0");
}

TEST(SweepInputs, BothControllerTolerancesZero) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>(
        [&] { s.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<stepcert::controller_tolerance>{{0.0, 0.0}}); },
        "not both zero");
}

TEST(SweepInputs, ZeroRepeats) {
    auto o = four_times();
    o.repeats = 0;
    expect_throw_saying<stepcert::invalid_input>([&] { stepcert::cost_accuracy_sweep s(stepcert::problems::harmonic_oscillator(), o); },
                                                 "repeats is 0");
}

TEST(SweepInputs, ZeroOutputTimes) {
    auto o = four_times();
    o.output_times = 0;
    expect_throw_saying<stepcert::invalid_input>([&] { stepcert::cost_accuracy_sweep s(stepcert::problems::harmonic_oscillator(), o); },
                                                 "output_times is 0");
}

TEST(SweepInputs, NoMethodsAdded) {
    auto s = oscillator_sweep();
    expect_throw_saying<stepcert::invalid_input>([&] { s.run(); }, "no methods added");
}

TEST(SweepInputs, NonPositiveTarget) {
    auto s = oscillator_sweep();
    s.add_fixed_step(stepcert::classic_rk4, {16, 32});
    const auto r = s.run();
    expect_throw_saying<stepcert::invalid_input>([&] { stepcert::cheapest_method(s, r, 0.0); }, "finite target > 0");
}

TEST(SweepInputs, NonFiniteTarget) {
    auto s = oscillator_sweep();
    s.add_fixed_step(stepcert::classic_rk4, {16, 32});
    const auto r = s.run();
    expect_throw_saying<stepcert::invalid_input>(
        [&] { stepcert::cheapest_method(s, r, std::numeric_limits<double>::infinity()); }, "finite target > 0");
}

TEST(SweepInputs, RunPointOfTheWrongKind) {
    auto s = oscillator_sweep();
    s.add_fixed_step(stepcert::classic_rk4, {16});
    expect_throw_saying<stepcert::invalid_input>([&] { s.run_point(0, stepcert::sweep_setting::adaptive({1e-6, 1e-6})); },
                                                 "is fixed_step but the setting is adaptive");
}

TEST(SweepInputs, NoTruthForADoubleOnlyProblemWithoutExactSolution) {
    // y' = -y with a right-hand side in double only: the reference cannot vouch 30 digits.
    const auto p = stepcert::make_problem("double-only decay", [](const std::array<double, 1>& y, std::array<double, 1>& d, double) { d[0] = -y[0]; },
                                          std::array<double, 1>{1.0}, 0.0, 1.0);
    stepcert::sweep_options o;
    o.truth_digits = 30;
    stepcert::cost_accuracy_sweep s(p, o);
    s.add_fixed_step(stepcert::classic_rk4, {16});
    expect_throw_saying<stepcert::accuracy_unreachable>([&] { s.run(); }, "no truth for problem 'double-only decay'");
}

TEST(SweepInputs, SymplecticMethodOnAProblemNotDeclaredSeparable) {
    // An oscillator in (q, p) layout, but not declared so (no as_separable()).
    const auto p = stepcert::make_problem(
        "undeclared oscillator", [](const auto& y, auto& dydt, auto) { dydt[0] = y[1]; dydt[1] = -y[0]; },
        std::array<double, 2>{1.0, 0.0}, 0.0, 1.0);
    stepcert::cost_accuracy_sweep s(p, four_times());
    expect_throw_saying<stepcert::unsupported_operation>([&] { s.add_fixed_step(stepcert::symplectic_rkn, {16}); },
                                                         "needs a separable problem");
}
