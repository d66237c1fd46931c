#pragma once
// The short names a user types on the command line, mapped to the library's problems and methods.
// Each family is a std::variant of the concrete types; commands std::visit it, so every
// (problem, method) pair is compiled once and no type is erased on the hot path.
#include <array>
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <variant>

#include "stepcert/core/error.hpp"
#include "stepcert/methods/bulirsch_stoer.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/methods/fehlberg78.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/problems/suspension_rig.hpp"

namespace stepcert_cli {

struct catalogue_entry {
    std::string_view name;     ///< what the user types
    std::string_view summary;  ///< one line for `problems` / `methods`
};

// ---- problems --------------------------------------------------------------------------------

struct problem_entry : catalogue_entry {
    double default_t_end;             ///< the interval's end when --t-end is not given
    std::size_t study_coarsest_steps;  ///< coarsest level of a default order study (inside the stability limit)
};

inline constexpr std::array<problem_entry, 5> problem_catalogue{{
    {{"oscillator", "harmonic oscillator q' = p, p' = -q on [0, 10]; exact solution; 2 unknowns"}, 10.0, 32},
    {{"kepler", "Kepler two-body orbit, eccentricity 0.5, on [0, 20]; exact solution; 4 unknowns"}, 20.0, 128},
    {{"linear", "linear system y' = A y in R^3 with a decaying oscillation, on [0, 4]; exact solution"}, 4.0, 16},
    {{"satellite", "small satellite about an oblate planet (J2), on [0, 30] (about 3.4 orbits); reference solution; 6 unknowns"},
     30.0, 256},
    {{"rig", "quarter-car suspension rig over a road bump, on [0, 3] s; reference solution; 4 unknowns"}, 3.0, 256},
}};

using any_problem = std::variant<decltype(stepcert::problems::harmonic_oscillator()), decltype(stepcert::problems::kepler(0.5)),
                                 decltype(stepcert::problems::linear_system()), decltype(stepcert::problems::small_satellite()),
                                 decltype(stepcert::problems::suspension_rig())>;
static_assert(std::variant_size_v<any_problem> == problem_catalogue.size(), "one variant alternative per catalogue entry");

// ---- methods ---------------------------------------------------------------------------------

struct method_entry : catalogue_entry {
    bool adaptive;
};

inline constexpr std::array<method_entry, 7> method_catalogue{{
    {{"euler", "explicit Euler, fixed step, order 1"}, false},
    {{"midpoint", "explicit midpoint rule, fixed step, order 2"}, false},
    {{"rk4", "classic Runge-Kutta, fixed step, order 4"}, false},
    {{"dp5", "Dormand-Prince 5(4) run with a fixed step, order 5"}, false},
    {{"rkf78", "Runge-Kutta-Fehlberg 7(8) run with a fixed step, order 8"}, false},
    {{"dopri5", "Dormand-Prince 5(4) with step-size control and dense output, order 5"}, true},
    {{"bs", "Bulirsch-Stoer extrapolation with order and step control, variable order"}, true},
}};

using any_method = std::variant<std::remove_cvref_t<decltype(stepcert::explicit_euler)>, std::remove_cvref_t<decltype(stepcert::explicit_midpoint)>,
                                std::remove_cvref_t<decltype(stepcert::classic_rk4)>, std::remove_cvref_t<decltype(stepcert::dormand_prince54)>,
                                std::remove_cvref_t<decltype(stepcert::fehlberg78)>,
                                std::remove_cvref_t<decltype(stepcert::dormand_prince54_adaptive)>,
                                std::remove_cvref_t<decltype(stepcert::bulirsch_stoer_adaptive)>>;
static_assert(std::variant_size_v<any_method> == method_catalogue.size(), "one variant alternative per catalogue entry");

// ---- lookup ----------------------------------------------------------------------------------

template <std::size_t N, class Entry>
std::string names_of(const std::array<Entry, N>& catalogue) {
    std::string s;
    for (const auto& e : catalogue) {
        if (!s.empty()) s += ", ";
        s += e.name;
    }
    return s;
}

template <std::size_t N, class Entry>
std::optional<std::size_t> index_of(const std::array<Entry, N>& catalogue, std::string_view name) {
    for (std::size_t i = 0; i < N; ++i)
        if (catalogue[i].name == name) return i;
    return std::nullopt;
}

/// "" when `name` is a catalogue problem, else the message saying which names exist.
inline std::string unknown_problem_message(std::string_view name) {
    if (index_of(problem_catalogue, name)) return {};
    std::string m = "unknown problem '";
    m += name;
    m += "'; choose one of: ";
    m += names_of(problem_catalogue);
    return m;
}

inline std::string unknown_method_message(std::string_view name) {
    if (index_of(method_catalogue, name)) return {};
    std::string m = "unknown method '";
    m += name;
    m += "'; choose one of: ";
    m += names_of(method_catalogue);
    return m;
}

inline const problem_entry& problem_info(std::string_view name) {
    if (const auto i = index_of(problem_catalogue, name)) return problem_catalogue[*i];
    throw stepcert::invalid_input(unknown_problem_message(name));
}

/// The problem named `name` on [t0, t_end]; t_end <= 0 keeps the problem's own interval.
inline any_problem make_problem(std::string_view name, double t_end) {
    const double t1 = t_end > 0.0 ? t_end : problem_info(name).default_t_end;
    namespace pb = stepcert::problems;
    switch (*index_of(problem_catalogue, name)) {
    case 0: return any_problem(std::in_place_index<0>, pb::harmonic_oscillator(1.0, t1));
    case 1: return any_problem(std::in_place_index<1>, pb::kepler(0.5, t1));
    case 2: return any_problem(std::in_place_index<2>, pb::linear_system(t1));
    case 3: return any_problem(std::in_place_index<3>, pb::small_satellite(t1));
    case 4: return any_problem(std::in_place_index<4>, pb::suspension_rig(t1));
    default: break;
    }
    throw stepcert::invalid_input(unknown_problem_message(name));
}

inline any_method make_method(std::string_view name) {
    const auto i = index_of(method_catalogue, name);
    if (!i) throw stepcert::invalid_input(unknown_method_message(name));
    switch (*i) {
    case 0: return any_method(std::in_place_index<0>, stepcert::explicit_euler);
    case 1: return any_method(std::in_place_index<1>, stepcert::explicit_midpoint);
    case 2: return any_method(std::in_place_index<2>, stepcert::classic_rk4);
    case 3: return any_method(std::in_place_index<3>, stepcert::dormand_prince54);
    case 4: return any_method(std::in_place_index<4>, stepcert::fehlberg78);
    case 5: return any_method(std::in_place_index<5>, stepcert::dormand_prince54_adaptive);
    case 6: return any_method(std::in_place_index<6>, stepcert::bulirsch_stoer_adaptive);
    default: break;
    }
    throw stepcert::invalid_input(unknown_method_message(name));
}

} // namespace stepcert_cli
