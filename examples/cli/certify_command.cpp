// stepcert_cli certify: the largest uniform step (fixed-step methods) or loosest controller
// tolerance (adaptive methods) that meets a tolerance on a catalogue problem, as a certificate.
#include <string>
#include <variant>

#include "stepcert/certify/certify_adaptive.hpp"
#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/report/certificate_json.hpp"
#include "stepcert/report/certificate_text.hpp"

#include "commands.hpp"
#include "output.hpp"
#include "registry.hpp"

namespace stepcert_cli {

int run_certify(const certify_request& q) {
    const any_problem problem = make_problem(q.problem, q.t_end);
    const any_method method = make_method(q.method);
    const stepcert::weighted_norm tolerance{q.tolerance.atol, q.tolerance.rtol, stepcert::norm_kind::max};
    stepcert::certify_options opt;
    opt.output_times = q.output_times;
    opt.verify_with_reference = !q.no_reference;
    const stepcert::step_certificate c =
        std::visit([&](const auto& p, const auto& m) { return stepcert::certify(p, m, tolerance, opt); }, problem, method);
    // Both forms carry the certificate's cautions (text: a closing list; JSON: "caution").
    deliver(q.format == "json" ? stepcert::to_json(c).dump(2) + "\n" : stepcert::certificate_text(c), q.output);
    return c.issued() ? 0 : 1;
}

} // namespace stepcert_cli
