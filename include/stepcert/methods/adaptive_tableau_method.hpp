#pragma once
// An adaptive method from any explicit tableau with embedded weights: adaptive_tableau_method(tab)
// runs through run_adaptive and every study as the odeint wrappers do, in any scalar type. Its
// step control is Boost.Odeint's (tableau_controlled_stepper), its loop stepcert's shared one
// (detail::controlled_loop). Evaluations: s - 1 per attempt plus one per accepted step, or
// s - 1 per attempt for a first-same-as-last pair such as Dormand–Prince; one more at the start
// (and one for the automatic starting step).
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "stepcert/methods/detail/adaptive_support.hpp"
#include "stepcert/methods/detail/controlled_loop.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/methods/tableau_error_stepper.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

template <class C>
struct embedded_tableau_method : detail::adaptive_method_identity<embedded_tableau_method<C>> {
    tableau<C> tab;
    std::string label_text;  ///< owned: name() must survive copies of the method

    std::string_view name() const { return label_text; }

    template <class Rhs, class S, class T, class Obs>
    void integrate_adaptive(Rhs rhs, S& y, T t0, const std::vector<T>& times, controller_tolerance tol, Obs obs,
                            run_stats& stats) const {
        tableau_controlled_stepper<S> stepper(tab, state_size(y), tol);
        detail::controlled_loop(stepper, {name(), this->initial_step, tab.claimed_order}, rhs, y, t0, times, tol, obs, stats);
    }
};

/// An adaptive method from an explicit tableau with embedded weights (validated: shape,
/// explicit, embedded weights present). Declared order: the claimed order of b.
template <class C>
embedded_tableau_method<C> adaptive_tableau_method(tableau<C> tab) {
    detail::require_explicit_tableau(tab, "adaptive_tableau_method", true);
    embedded_tableau_method<C> m;
    m.declared_order = tab.claimed_order;
    m.label_text = tab.name + " adaptive";
    m.tab = std::move(tab);
    return m;
}

} // namespace stepcert
