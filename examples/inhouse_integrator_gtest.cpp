// How a team checks its own hand-written integrator in CI: a GoogleTest file that runs order
// studies on the team's model (here a thermal network of our own: a battery pack's cells and
// coolant plate, invented data) and on a problem with a known solution.
#include <array>
#include <cmath>

#include <gtest/gtest.h>

#include "stepcert/stepcert.hpp"
#include "stepcert/testing/gtest.hpp"

namespace {

// The team's integrator: Ralston's third-order method, written by hand, generic in the scalar
// type so stepcert can also run it against its multiprecision reference.
// (Tableau: A. Ralston, Math. Comp. 16 (1962) 431–437 — from memory: c = (0, 1/2, 3/4),
//  b = (2/9, 1/3, 4/9).)
struct ralston3_step {
    template <class Rhs, class S, class T>
    void operator()(Rhs& rhs, S& y, T t, T h) const {
        S k1 = y, k2 = y, k3 = y, tmp = y;
        rhs(y, k1, t);
        for (std::size_t i = 0; i < y.size(); ++i) tmp[i] = y[i] + h * k1[i] / 2;
        rhs(tmp, k2, t + h / 2);
        for (std::size_t i = 0; i < y.size(); ++i) tmp[i] = y[i] + 3 * h * k2[i] / 4;
        rhs(tmp, k3, t + 3 * h / 4);
        for (std::size_t i = 0; i < y.size(); ++i) y[i] += h * (2 * k1[i] + 3 * k2[i] + 4 * k3[i]) / 9;
    }
};

const auto ralston3 = stepcert::one_step_method("team Ralston 3", 3, ralston3_step{});

// Three cells exchanging heat with a coolant plate; heat generation rises with temperature
// (invented data; temperatures in kelvin above coolant inlet, time in minutes).
struct battery_pack_heat {
    template <class S, class T>
    void operator()(const S& y, S& dydt, T) const {
        using U = typename S::value_type;
        const U g(3), c(1), k(2), kp(5);  // generation, heat capacity, cell-cell and cell-plate conductance
        for (std::size_t i = 0; i < 3; ++i) {
            U q = g * (1 + y[i] / 40) - kp * (y[i] - y[3]);
            if (i > 0) q += k * (y[i - 1] - y[i]);
            if (i < 2) q += k * (y[i + 1] - y[i]);
            dydt[i] = q / c;
        }
        dydt[3] = kp * (y[0] + y[1] + y[2] - 3 * y[3]) / 8 - y[3];  // plate, cooled by the flow
    }
};

} // namespace

// On the team's own model there is no closed form: stepcert measures against its multiprecision reference.
TEST(TeamIntegrator, ConvergesAtDesignOrderOnBatteryModel) {
    const auto pack = stepcert::make_problem("battery pack heat", battery_pack_heat{}, std::array<double, 4>{0, 0, 0, 0}, 0.0, 3.0);
    EXPECT_TRUE(stepcert::testing::study_converges_at_declared_order(pack, ralston3, stepcert::step_ladder{16, 2.0, 8}));
}

// On a problem with a known solution: Kepler's problem, DETEST class D (Hull, Enright, Fellen,
// Sedgwick, SIAM J. Numer. Anal. 9 (1972) 603–637), exact solution from Kepler's equation.
TEST(TeamIntegrator, ConvergesAtDesignOrderOnKepler) {
    const auto orbit = stepcert::problems::kepler(0.3, 10.0);
    EXPECT_TRUE(stepcert::testing::study_converges_at_declared_order(orbit, ralston3, stepcert::step_ladder{64, 2.0, 7}));
}
