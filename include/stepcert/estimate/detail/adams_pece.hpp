#pragma once
// One Adams–Bashforth–Moulton PECE step from a history of derivatives, and a run of them started
// as odeint's adams_bashforth_moulton<Steps> starts (same start-up stepper, same coefficient
// tables, same left-to-right sums), so that the predictor of every step of the method's own run
// can be kept. Shared by Milne's device and the true multistep local error.
#include "stepcert/methods/odeint_types.hpp"

#include <array>
#include <cstddef>
#include <utility>

#include <boost/numeric/odeint/stepper/detail/adams_bashforth_coefficients.hpp>
#include <boost/numeric/odeint/stepper/detail/adams_moulton_coefficients.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/methods/adams_bashforth_moulton.hpp"

namespace stepcert::detail {

/// Error constants of the Steps-step Adams–Bashforth predictor (C) and of the Steps-value
/// Adams–Moulton corrector (C*), both of order p = Steps, for exact - computed = C h^(p+1) y^(p+1).
/// Index convention: C = gamma_Steps and C* = gamma*_Steps, where gamma_k, gamma*_k are the Adams
/// sequences 1, 1/2, 5/12, ... and 1, -1/2, -1/12, ... with gamma_0 = gamma*_0 = 1 (Hairer,
/// Nørsett, Wanner, Solving ODEs I, §III.1 — from memory; the test re-derives them from odeint's
/// coefficient tables). C - C* = gamma_(Steps-1), so Milne's factor C*/(C - C*) is -19/270 for Steps = 4.
template <class T>
struct adams_error_constants {
    T predictor;  ///< C
    T corrector;  ///< C*
};

template <class T>
adams_error_constants<T> adams_pece_error_constants(std::size_t steps) {
    static constexpr long long gamma[9][2] = {{1, 1},         {1, 2},          {5, 12},      {3, 8},          {251, 720},
                                              {95, 288},      {19087, 60480},  {5257, 17280}, {1070017, 3628800}};
    static constexpr long long gamma_star[9][2] = {{1, 1},        {-1, 2},         {-1, 12},      {-1, 24},          {-19, 720},
                                                   {-3, 160},     {-863, 60480},   {-275, 24192}, {-33953, 3628800}};
    return {static_cast<T>(gamma[steps][0]) / static_cast<T>(gamma[steps][1]),
            static_cast<T>(gamma_star[steps][0]) / static_cast<T>(gamma_star[steps][1])};
}

/// The last Steps derivatives, newest first: [0] = f_n, [1] = f_(n-1), ... (odeint's order).
template <class S, std::size_t Steps>
class derivative_history {
public:
    explicit derivative_history(const S& shape) { values_.fill(shape); }
    /// Room for a new newest derivative (the oldest is dropped); write it into the result.
    S& push_front() {
        first_ = first_ == 0 ? Steps - 1 : first_ - 1;
        return values_[first_];
    }
    const S& operator[](std::size_t i) const { return values_[(first_ + i) % Steps]; }

private:
    std::array<S, Steps> values_;
    std::size_t first_ = 0;
};

/// h times odeint's coefficients: b_i of the predictor on f_(n-i), c_0 of the corrector on
/// f(t + h, y_p) and c_i (i >= 1) on f_(n-i+1).
template <std::size_t Steps, class T>
struct adams_pece_weights {
    std::array<T, Steps> predictor, corrector;
    explicit adams_pece_weights(const T& h) {
        const boost::numeric::odeint::detail::adams_bashforth_coefficients<T, Steps> b;
        const boost::numeric::odeint::detail::adams_moulton_coefficients<T, Steps> c;
        for (std::size_t i = 0; i < Steps; ++i) {
            predictor[i] = h * b[i];
            corrector[i] = h * c[i];
        }
    }
};

/// One PECE step of h from y at t, given f[0] = f(t, y): the predictor y_p, its slope
/// f(t + h, y_p) (one evaluation) and the corrector y_c.
template <std::size_t Steps, class Rhs, class S, class T>
void adams_pece_step(Rhs& rhs, const adams_pece_weights<Steps, T>& w, const S& y, const derivative_history<S, Steps>& f,
                     const T& t, const T& h, S& predicted, S& slope, S& corrected) {
    const std::size_t size = state_size(y);
    // The history's ring positions once per step, not once per component (the sums are unchanged).
    std::array<const S*, Steps> past;
    for (std::size_t k = 0; k < Steps; ++k) past[k] = &f[k];
    for (std::size_t i = 0; i < size; ++i) {
        T sum = y[i];
        for (std::size_t k = 0; k < Steps; ++k) sum += w.predictor[k] * (*past[k])[i];
        predicted[i] = sum;
    }
    rhs(std::as_const(predicted), slope, t + h);
    for (std::size_t i = 0; i < size; ++i) {
        T sum = y[i];
        sum += w.corrector[0] * slope[i];
        for (std::size_t k = 1; k < Steps; ++k) sum += w.corrector[k] * (*past[k - 1])[i];
        corrected[i] = sum;
    }
}

/// n steps of adams_bashforth_moulton<Steps> from y at t0, as odeint takes them: Steps - 1
/// start-up steps with odeint_stepper::adams_start_up<Steps, S>, then PECE steps (2 evaluations
/// each). After each PECE step j (j >= Steps - 1, from t_j = t0 + j h) it calls
/// visit(t_j, y_p, y_c); y ends at t0 + n h.
template <std::size_t Steps, class Rhs, class S, class T, class Visit>
void adams_pece_run(Rhs& rhs, S& y, const T& t0, const T& h, std::size_t n, Visit&& visit) {
    derivative_history<S, Steps> f(y);
    odeint_stepper::adams_start_up<Steps, S> start_up;
    const adams_pece_weights<Steps, T> w(h);
    S predicted = y, slope = y, corrected = y;
    for (std::size_t j = 0; j < n; ++j) {
        const T t = t0 + static_cast<T>(j) * h;
        S& newest = f.push_front();
        rhs(std::as_const(y), newest, t);
        if (j + 1 < Steps) {
            // The call odeint's adams_bashforth makes for its start-up steps (slope at t given).
            start_up.do_step_dxdt_impl(rhs, y, std::as_const(newest), t, h);
            continue;
        }
        adams_pece_step(rhs, w, y, f, t, h, predicted, slope, corrected);
        visit(t, std::as_const(predicted), std::as_const(corrected));
        std::swap(y, corrected);
    }
}

} // namespace stepcert::detail
