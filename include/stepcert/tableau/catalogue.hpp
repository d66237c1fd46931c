#pragma once
// Published Butcher tableaus, coefficients as the sources give them (exact fractions), in any
// scalar type T: stepcert::tableaus::classic_rk4<boost::multiprecision::cpp_rational>() is exact.
// Sources (journal details marked "from memory" were not rechecked against the paper):
//   explicit Euler, L. Euler, Institutiones calculi integralis (1768) — common practice;
//   explicit midpoint, C. Runge, Math. Ann. 46 (1895) 167–178 — from memory;
//   Heun's second-order method, K. Heun, Z. Math. Phys. 45 (1900) 23–38 — from memory;
//   Ralston's second-order method (c2 = 2/3), A. Ralston, Math. Comp. 16 (1962) 431–437 — from memory;
//   Kutta's third-order method, classic RK4 and the 3/8 rule, W. Kutta, Z. Math. Phys. 46 (1901)
//     435–453 — from memory;
//   three-stage SSP method of order 3, C.-W. Shu, S. Osher, J. Comput. Phys. 77 (1988) 439–471 — from memory;
//   Bogacki–Shampine 3(2), P. Bogacki, L. F. Shampine, Appl. Math. Lett. 2 (1989) 321–325 — from memory;
//   Fehlberg 4(5), E. Fehlberg, NASA TR R-315 (1969) — from memory;
//   Cash–Karp 5(4), J. R. Cash, A. H. Karp, ACM TOMS 16 (1990) 201–222 (as in Boost.Odeint's
//     runge_kutta_cash_karp54);
//   Dormand–Prince 5(4), J. R. Dormand, P. J. Prince, J. Comput. Appl. Math. 6 (1980) 19–26 (as in
//     Boost.Odeint's runge_kutta_dopri5);
//   Fehlberg 7(8), E. Fehlberg, NASA TR R-287 (1968) — from memory (as in Boost.Odeint's
//     runge_kutta_fehlberg78);
//   backward Euler and the implicit midpoint rule — common practice, no source;
//   the L-stable SDIRK method of order 4 with an embedded method of order 3 (five stages,
//     gamma = 1/4), E. Hairer, G. Wanner, Solving ODEs II, §IV.6, Table 6.5 — from memory;
//   Gauss–Legendre with 2 and 3 stages (J. C. Butcher, Math. Comp. 18 (1964) 50–64) and Radau IIA
//     with 3 stages (B. L. Ehle 1969), coefficients as tabulated in E. Hairer, G. Wanner, Solving
//     ODEs II, §IV.5, Tables 5.1, 5.2 and 5.6 — from memory. Their coefficients involve sqrt(3),
//     sqrt(15) and sqrt(6), so they exist in floating types only.
// The order checker (order_conditions.hpp) confirms every claimed order exactly in the tests.
#include <cmath>
#include <limits>
#include <vector>

#include "stepcert/tableau/tableau.hpp"

namespace stepcert::tableaus {

template <class T>
tableau<T> explicit_euler() {
    return tableau_from_text<T>("explicit Euler", 1, {{"0"}}, {"1"}, {"0"});
}

template <class T>
tableau<T> explicit_midpoint() {
    return tableau_from_text<T>("explicit midpoint", 2, {{}, {"1/2"}}, {"0", "1"}, {"0", "1/2"});
}

template <class T>
tableau<T> heun2() {
    return tableau_from_text<T>("Heun 2", 2, {{}, {"1"}}, {"1/2", "1/2"}, {"0", "1"});
}

template <class T>
tableau<T> ralston2() {
    return tableau_from_text<T>("Ralston 2", 2, {{}, {"2/3"}}, {"1/4", "3/4"}, {"0", "2/3"});
}

template <class T>
tableau<T> kutta3() {
    return tableau_from_text<T>("Kutta 3", 3, {{}, {"1/2"}, {"-1", "2"}}, {"1/6", "2/3", "1/6"}, {"0", "1/2", "1"});
}

template <class T>
tableau<T> ssp_rk3() {
    return tableau_from_text<T>("SSP RK3 (Shu-Osher)", 3, {{}, {"1"}, {"1/4", "1/4"}}, {"1/6", "1/6", "2/3"}, {"0", "1", "1/2"});
}

template <class T>
tableau<T> classic_rk4() {
    return tableau_from_text<T>("classic RK4", 4, {{}, {"1/2"}, {"0", "1/2"}, {"0", "0", "1"}}, {"1/6", "1/3", "1/3", "1/6"},
                                {"0", "1/2", "1/2", "1"});
}

template <class T>
tableau<T> three_eighths_rule() {
    return tableau_from_text<T>("3/8 rule", 4, {{}, {"1/3"}, {"-1/3", "1"}, {"1", "-1", "1"}}, {"1/8", "3/8", "3/8", "1/8"},
                                {"0", "1/3", "2/3", "1"});
}

template <class T>
tableau<T> bogacki_shampine32() {
    return tableau_from_text<T>("Bogacki-Shampine 3(2)", 3, {{}, {"1/2"}, {"0", "3/4"}, {"2/9", "1/3", "4/9"}},
                                {"2/9", "1/3", "4/9", "0"}, {"0", "1/2", "3/4", "1"}, {"7/24", "1/4", "1/3", "1/8"}, 2);
}

/// Propagates the 4th-order weights (as Fehlberg intended); the embedded weights are of order 5.
template <class T>
tableau<T> fehlberg45() {
    return tableau_from_text<T>("Fehlberg 4(5)", 4,
                                {{},
                                 {"1/4"},
                                 {"3/32", "9/32"},
                                 {"1932/2197", "-7200/2197", "7296/2197"},
                                 {"439/216", "-8", "3680/513", "-845/4104"},
                                 {"-8/27", "2", "-3544/2565", "1859/4104", "-11/40"}},
                                {"25/216", "0", "1408/2565", "2197/4104", "-1/5", "0"}, {"0", "1/4", "3/8", "12/13", "1", "1/2"},
                                {"16/135", "0", "6656/12825", "28561/56430", "-9/50", "2/55"}, 5);
}

template <class T>
tableau<T> cash_karp54() {
    return tableau_from_text<T>("Cash-Karp 5(4)", 5,
                                {{},
                                 {"1/5"},
                                 {"3/40", "9/40"},
                                 {"3/10", "-9/10", "6/5"},
                                 {"-11/54", "5/2", "-70/27", "35/27"},
                                 {"1631/55296", "175/512", "575/13824", "44275/110592", "253/4096"}},
                                {"37/378", "0", "250/621", "125/594", "0", "512/1771"}, {"0", "1/5", "3/10", "3/5", "1", "7/8"},
                                {"2825/27648", "0", "18575/48384", "13525/55296", "277/14336", "1/4"}, 4);
}

/// Seven stages; the seventh (first same as last) row of A equals b.
template <class T>
tableau<T> dormand_prince54() {
    return tableau_from_text<T>("Dormand-Prince 5(4)", 5,
                                {{},
                                 {"1/5"},
                                 {"3/40", "9/40"},
                                 {"44/45", "-56/15", "32/9"},
                                 {"19372/6561", "-25360/2187", "64448/6561", "-212/729"},
                                 {"9017/3168", "-355/33", "46732/5247", "49/176", "-5103/18656"},
                                 {"35/384", "0", "500/1113", "125/192", "-2187/6784", "11/84"}},
                                {"35/384", "0", "500/1113", "125/192", "-2187/6784", "11/84", "0"},
                                {"0", "1/5", "3/10", "4/5", "8/9", "1", "1"},
                                {"5179/57600", "0", "7571/16695", "393/640", "-92097/339200", "187/2100", "1/40"}, 4);
}

/// Thirteen stages; propagates the 8th-order weights, the 7th-order ones give the estimate
/// (as Boost.Odeint's runge_kutta_fehlberg78, whose coefficients these are).
template <class T>
tableau<T> fehlberg78() {
    return tableau_from_text<T>(
        "Fehlberg 7(8)", 8,
        {{},
         {"2/27"},
         {"1/36", "1/12"},
         {"1/24", "0", "1/8"},
         {"5/12", "0", "-25/16", "25/16"},
         {"1/20", "0", "0", "1/4", "1/5"},
         {"-25/108", "0", "0", "125/108", "-65/27", "125/54"},
         {"31/300", "0", "0", "0", "61/225", "-2/9", "13/900"},
         {"2", "0", "0", "-53/6", "704/45", "-107/9", "67/90", "3"},
         {"-91/108", "0", "0", "23/108", "-976/135", "311/54", "-19/60", "17/6", "-1/12"},
         {"2383/4100", "0", "0", "-341/164", "4496/1025", "-301/82", "2133/4100", "45/82", "45/164", "18/41"},
         {"3/205", "0", "0", "0", "0", "-6/41", "-3/205", "-3/41", "3/41", "6/41", "0"},
         {"-1777/4100", "0", "0", "-341/164", "4496/1025", "-289/82", "2193/4100", "51/82", "33/164", "12/41", "0", "1"}},
        {"0", "0", "0", "0", "0", "34/105", "9/35", "9/35", "9/280", "9/280", "0", "41/840", "41/840"},
        {"0", "2/27", "1/9", "1/6", "5/12", "1/2", "5/6", "1/6", "2/3", "1/3", "1", "0", "1"},
        {"41/840", "0", "0", "0", "0", "34/105", "9/35", "9/35", "9/280", "9/280", "41/840", "0", "0"}, 7);
}

template <class T>
tableau<T> backward_euler() {
    return tableau_from_text<T>("backward Euler", 1, {{"1"}}, {"1"}, {"1"});
}

template <class T>
tableau<T> implicit_midpoint() {
    return tableau_from_text<T>("implicit midpoint", 2, {{"1/2"}}, {"1"}, {"1/2"});
}

/// Five-stage singly diagonally implicit method of order 4, L-stable and stiffly accurate
/// (b is the last row of A), with embedded weights of order 3. Exact in rationals.
template <class T>
tableau<T> sdirk4() {
    return tableau_from_text<T>("SDIRK 4(3)", 4,
                                {{"1/4"},
                                 {"1/2", "1/4"},
                                 {"17/50", "-1/25", "1/4"},
                                 {"371/1360", "-137/2720", "15/544", "1/4"},
                                 {"25/24", "-49/48", "125/16", "-85/12", "1/4"}},
                                {"25/24", "-49/48", "125/16", "-85/12", "1/4"}, {"1/4", "3/4", "11/20", "1/2", "1"},
                                {"59/48", "-17/96", "225/32", "-85/12", "0"}, 3);
}

namespace detail {
template <class T>
T root_of(int n) {
    static_assert(!std::numeric_limits<T>::is_exact,
                  "stepcert::tableaus: this tableau has irrational coefficients (square roots); use double or a "
                  "Boost.Multiprecision float such as cpp_bin_float_50, not an exact rational type.");
    using std::sqrt;
    return sqrt(T(n));
}
template <class T>
tableau<T> implicit_tableau(const char* name, int order, std::vector<std::vector<T>> a, std::vector<T> b, std::vector<T> c) {
    tableau<T> t;
    t.name = name;
    t.claimed_order = order;
    t.a = std::move(a);
    t.b = std::move(b);
    t.c = std::move(c);
    t.validate_shape();
    return t;
}
} // namespace detail

/// Two-stage Gauss–Legendre, order 4.
template <class T>
tableau<T> gauss_legendre2() {
    const T r3 = detail::root_of<T>(3), q = T(1) / 4, h = T(1) / 2;
    return detail::implicit_tableau<T>("Gauss-Legendre 2", 4, {{q, q - r3 / 6}, {q + r3 / 6, q}}, {h, h}, {h - r3 / 6, h + r3 / 6});
}

/// Three-stage Gauss–Legendre, order 6.
template <class T>
tableau<T> gauss_legendre3() {
    const T r = detail::root_of<T>(15), h = T(1) / 2, f = T(5) / 36, g = T(2) / 9;
    return detail::implicit_tableau<T>("Gauss-Legendre 3", 6,
                                       {{f, g - r / 15, f - r / 30}, {f + r / 24, g, f - r / 24}, {f + r / 30, g + r / 15, f}},
                                       {T(5) / 18, T(4) / 9, T(5) / 18}, {h - r / 10, h, h + r / 10});
}

/// Three-stage Radau IIA, order 5 (stiffly accurate: b is the last row of A).
template <class T>
tableau<T> radau_iia3() {
    const T r = detail::root_of<T>(6);
    std::vector<std::vector<T>> a{{(88 - 7 * r) / 360, (296 - 169 * r) / 1800, (-2 + 3 * r) / 225},
                                  {(296 + 169 * r) / 1800, (88 + 7 * r) / 360, (-2 - 3 * r) / 225},
                                  {(16 - r) / 36, (16 + r) / 36, T(1) / 9}};
    std::vector<T> b = a[2];
    return detail::implicit_tableau<T>("Radau IIA 3", 5, std::move(a), std::move(b), {(4 - r) / 10, (4 + r) / 10, T(1)});
}

} // namespace stepcert::tableaus
