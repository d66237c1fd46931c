#pragma once
// Does a stored certificate still hold for this problem and method? For CI after a model
// change: the certified step is judged again from scratch (certify_step_count with the
// certificate's tolerance, output times and safety factor), and it holds only when the same
// problem and method (name, size, interval, declared order) meet the tolerance at the same step
// with evidence at least as strong as before.
#include <cmath>
#include <string>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/certify/certify_step_count.hpp"

namespace stepcert {

struct certificate_check {
    bool holds = false;
    std::string why;           ///< what changed or failed, or what confirmed it
    step_certificate current;  ///< the judgement made now (empty when the identity differs)
};

template <problem_like P, fixed_step_method M>
certificate_check check_certificate(const step_certificate& stored, const P& p, const M& m, certify_options opt = {}) {
    const std::string who = "stepcert::check_certificate: ";
    if (!stored.issued())
        throw invalid_input(who + "the certificate was not issued (" + std::string(to_string(stored.reason)) +
                            "): there is no step to check; certify again instead.");
    certificate_check out;
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
    if (!differs.empty()) {
        out.why = "not the certified problem and method: " + differs + ".";
        return out;
    }
    opt.measured_at = stored.measured_at;
    opt.output_times = stored.output_times;
    if (std::isfinite(stored.safety_factor)) opt.safety_factor = stored.safety_factor;
    opt.verify_with_reference = opt.verify_with_reference || stored.level == evidence_level::reference_verified;
    out.current = certify_step_count(p, m, stored.steps, stored.tolerance, opt);
    const bool as_strong = stored.level != evidence_level::reference_verified ||
                           out.current.level == evidence_level::reference_verified;
    out.holds = out.current.issued() && as_strong;
    if (!out.current.issued())
        out.why = "the step no longer meets the tolerance: " + std::string(to_string(out.current.reason)) + " (" +
                  out.current.reason_detail + ")";
    else if (!as_strong)
        out.why = "the step meets the tolerance only by estimate now; it was reference-verified (" + out.current.basis + ")";
    else
        out.why = out.current.level == evidence_level::reference_verified
                      ? "holds: reference-verified, error " + detail::certificate_number(out.current.reference_error) +
                            " of the tolerance against the reference"
                      : "holds: estimated, error band " + detail::certificate_number(out.current.error_band) + " of the tolerance";
    return out;
}

} // namespace stepcert
