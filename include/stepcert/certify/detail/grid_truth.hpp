#pragma once
// The true solution at the certification's output times (reference/detail/truth_on_grid.hpp),
// with as many vouched digits as the tolerance needs, computed once per certification.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/reference/detail/truth_on_grid.hpp"

namespace stepcert::detail {

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
            try {
                truth_ = truth_on_grid(p_, G_, digits_to_judge(tol_, p_.y0()), why_);
            } catch (const non_finite_value& e) {
                why_ = e.what();
                non_finite_ = true;
            }
        }
        if (!truth_) return nullptr;
        c.reference_digits = truth_->digits;
        c.reference_evaluations = truth_->evaluations;
        return &truth_->states;
    }
    const std::string& why() const { return why_; }
    /// True when the reference itself met a NaN or infinity (why() says where).
    bool non_finite() const { return non_finite_; }

private:
    const P& p_;
    std::size_t G_;
    weighted_norm tol_;
    bool tried_ = false;
    bool non_finite_ = false;
    std::optional<grid_truth<state>> truth_;
    std::string why_;
};

} // namespace stepcert::detail
