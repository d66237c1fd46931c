#pragma once
// Does a stored certificate still hold for this problem and method? For CI after a model
// change: the certified step (certify_step_count) or controller tolerance
// (certify_controller_tolerance) is judged again from scratch with the certificate's tolerance,
// output times and safety factor, and it holds only when the same problem and method (name,
// size, interval, declared order) meet the tolerance with evidence at least as strong as before.
// A bounded certificate is judged by the reference or the estimate (the user's constants are not
// stored: re-run certify_by_bound to prove it again).
#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/certify/certify_adaptive.hpp"
#include "stepcert/certify/certify_step_count.hpp"

namespace stepcert {

struct certificate_check {
    bool holds = false;
    std::string why;           ///< what changed or failed, or what confirmed it
    step_certificate current;  ///< the judgement made now (empty when the identity differs)
};

namespace detail {

/// "" when the certificate was issued for this problem and method, else what differs.
template <class P, class M>
std::string certificate_identity_differs(const step_certificate& stored, const P& p, const M& m) {
    if (!stored.issued())
        throw invalid_input("stepcert::check_certificate: the certificate was not issued (" + std::string(to_string(stored.reason)) +
                            "): there is nothing to check; certify again instead.");
    std::string differs;
    auto compare = [&](bool same, const std::string& what) {
        if (!same) differs += (differs.empty() ? "" : "; ") + what;
    };
    compare(stored.problem == p.name(), "problem '" + stored.problem + "' is now '" + p.name() + "'");
    compare(stored.dimension == p.dimension(), "dimension " + std::to_string(stored.dimension) + " is now " +
                                                   std::to_string(p.dimension()));
    compare(stored.t0 == static_cast<double>(p.t0()) && stored.t1 == static_cast<double>(p.t1()), "the interval changed");
    compare(stored.method == m.name(), "method '" + stored.method + "' is now '" + std::string(m.name()) + "'");
    compare(stored.declared_order == m.order(), "the declared order changed");
    std::vector<double> breaks;
    for (const auto& b : breakpoints_of(p)) breaks.push_back(static_cast<double>(b));
    compare(stored.breakpoints == breaks, "the breakpoints changed");
    return differs;
}

/// The options a stored certificate was judged with, for judging it again.
inline certify_options options_of(const step_certificate& stored, certify_options opt) {
    opt.measured_at = stored.measured_at;
    opt.output_times = stored.output_times;
    if (std::isfinite(stored.safety_factor)) opt.safety_factor = stored.safety_factor;
    opt.verify_with_reference = opt.verify_with_reference || stored.level == evidence_level::reference_verified;
    return opt;
}

inline certificate_check verdict(const step_certificate& stored, step_certificate current) {
    certificate_check out;
    out.current = std::move(current);
    const bool as_strong = stored.level != evidence_level::reference_verified ||
                           out.current.level == evidence_level::reference_verified;
    out.holds = out.current.issued() && as_strong;
    if (!out.current.issued())
        out.why = "the certified setting no longer meets the tolerance: " + std::string(to_string(out.current.reason)) + " (" +
                  out.current.reason_detail + ")";
    else if (!as_strong)
        out.why = "it meets the tolerance only by estimate now; it was reference-verified (" + out.current.basis + ")";
    else
        out.why = out.current.level == evidence_level::reference_verified
                      ? "holds: reference-verified, error " + certificate_number(out.current.reference_error) +
                            " of the tolerance against the reference"
                      : "holds: estimated, error band " + certificate_number(out.current.error_band) + " of the tolerance";
    return out;
}

} // namespace detail

/// A fixed-step certificate: its step count judged again (certify_step_count).
template <problem_like P, fixed_step_method M>
certificate_check check_certificate(const step_certificate& stored, const P& p, const M& m, certify_options opt = {}) {
    if (const std::string differs = detail::certificate_identity_differs(stored, p, m); !differs.empty())
        return {false, "not the certified problem and method: " + differs + ".", {}};
    return detail::verdict(stored, certify_step_count(p, m, stored.steps, stored.tolerance, detail::options_of(stored, opt)));
}

/// An adaptive certificate: its controller tolerances judged again (certify_controller_tolerance).
template <problem_like P, adaptive_method M>
certificate_check check_certificate(const step_certificate& stored, const P& p, const M& m, certify_options opt = {}) {
    if (const std::string differs = detail::certificate_identity_differs(stored, p, m); !differs.empty())
        return {false, "not the certified problem and method: " + differs + ".", {}};
    if (!std::isfinite(stored.controller_atol) || !std::isfinite(stored.controller_rtol))
        throw invalid_input("stepcert::check_certificate: the certificate holds no controller tolerances; it was issued for "
                            "a fixed-step method, not for '" + std::string(m.name()) + "'.");
    return detail::verdict(stored, certify_controller_tolerance(p, m, {stored.controller_atol, stored.controller_rtol},
                                                                stored.tolerance, detail::options_of(stored, opt)));
}

} // namespace stepcert
