#pragma once
// The true solution at the certification's output times, in double: the exact solution when the
// problem has one (evaluated in 50 digits when it is generic), else a multiprecision reference
// with enough vouched digits to judge the tolerance. Rounded to double it stays about 1e-16
// relative from the truth, far below any tolerance the round-off check lets through.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/reference/exact_evaluation.hpp"
#include "stepcert/reference/reference_solution.hpp"

namespace stepcert::detail {

template <class S>
struct grid_truth {
    std::vector<S> states;   ///< at t0 + j (t1 - t0) / G, j = 1..G
    double digits = 0.0;     ///< vouched digits (exact: 30)
    std::size_t evaluations = 0;
    std::string how;
};

/// Digits the truth needs: its error at most 1e-3 of the tolerance's smallest absolute part.
template <class S>
int digits_to_judge(const weighted_norm& tol, const S& y0) {
    double scale = 0.0, smallest = std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < state_size(y0); ++i) {
        const double y = std::abs(static_cast<double>(y0[i]));
        scale = std::max(scale, y);
        smallest = std::min(smallest, tol.atol + tol.rtol * y);
    }
    scale = std::max(scale, smallest);
    const double d = std::ceil(std::log10(scale / smallest)) + 3.0;
    return static_cast<int>(std::clamp(d, 8.0, 30.0));
}

/// The truth on the grid of G points, or nullopt with the reason in `why`.
template <class P>
auto truth_on_grid(const P& p, std::size_t G, const weighted_norm& tol, std::string& why)
    -> std::optional<grid_truth<rebind_state<typename P::state_type, double>>> {
    using D = rebind_state<typename P::state_type, double>;
    grid_truth<D> out;
    if constexpr (P::has_exact) {
        using X = detail::exact_real_for<P, double>;
        using SX = rebind_state<typename P::state_type, X>;
        const std::vector<X> times = uniform_times{G}.in<X>(static_cast<X>(p.t0()), static_cast<X>(p.t1()));
        SX exact = state_traits<SX>::make(p.dimension());
        for (std::size_t j = 0; j < G; ++j) {
            p.exact()(times[j], exact);
            out.states.push_back(convert_state<D>(exact));
        }
        out.digits = std::numeric_limits<X>::digits10;
        out.how = "exact solution";
        return out;
    } else {
        const int digits = digits_to_judge(tol, p.y0());
        try {
            const auto ref = reference_solution(p, digits, uniform_times{G});
            out.evaluations = ref.cost.evaluations;
            out.digits = ref.vouched_digits;
            out.how = ref.how;
            if (!ref.vouches_requested()) {
                why = "the reference vouches for " + std::to_string(ref.vouched_digits) + " digits, fewer than the " +
                      std::to_string(digits) + " needed to judge this tolerance";
                return std::nullopt;
            }
            for (const auto& y : ref.states) out.states.push_back(convert_state<D>(y));
            return out;
        } catch (const error& e) {
            why = e.what();
            return std::nullopt;
        }
    }
}

/// The truth, computed the first time it is asked for, and recorded in the certificate (its
/// digits and cost) whenever it is at hand; why() says why not, when it is not.
template <class P>
class truth_once {
public:
    using state = rebind_state<typename P::state_type, double>;

    truth_once(const P& p, std::size_t G, const weighted_norm& tol) : p_(p), G_(G), tol_(tol) {}

    const std::vector<state>* get(step_certificate& c) {
        if (!tried_) {
            tried_ = true;
            truth_ = truth_on_grid(p_, G_, tol_, why_);
        }
        if (!truth_) return nullptr;
        c.reference_digits = truth_->digits;
        c.reference_evaluations = truth_->evaluations;
        return &truth_->states;
    }
    const std::string& why() const { return why_; }

private:
    const P& p_;
    std::size_t G_;
    weighted_norm tol_;
    bool tried_ = false;
    std::optional<grid_truth<state>> truth_;
    std::string why_;
};

} // namespace stepcert::detail
