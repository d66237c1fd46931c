// stepcert_cli order-study: observed order of convergence of one method on one catalogue problem.
#include <sstream>
#include <string>
#include <variant>

#include "stepcert/methods/method.hpp"
#include "stepcert/report/csv.hpp"
#include "stepcert/report/json.hpp"
#include "stepcert/report/study_table.hpp"
#include "stepcert/study/order_study.hpp"

#include "commands.hpp"
#include "output.hpp"
#include "registry.hpp"

namespace stepcert_cli {

namespace {

std::string study_text(const stepcert::order_study_result& r, const std::string& format) {
    if (format == "json") return stepcert::study_to_json(r).dump(2) + "\n";
    if (format == "csv") {
        // Every export of error figures opens with its caution (DEVELOPERS.md, file formats).
        std::string s = "# caution: ";
        s += stepcert::study_caution;
        s += "\n";
        s += stepcert::study_csv(r);
        return s;
    }
    return stepcert::study_table(r);
}

} // namespace

int run_order_study(const order_study_request& q) {
    const problem_entry& info = problem_info(q.problem);
    const any_problem problem = make_problem(q.problem, q.t_end);
    const any_method method = make_method(q.method);
    stepcert::study_options opt;
    opt.norm = stepcert::weighted_norm{q.norm.atol, q.norm.rtol, stepcert::norm_kind::max};
    const auto result = std::visit(
        [&](const auto& p, const auto& m) {
            using M = std::remove_cvref_t<decltype(m)>;
            if constexpr (stepcert::fixed_step_method<M>) {
                const std::size_t n0 = q.coarsest_steps > 0 ? q.coarsest_steps : info.study_coarsest_steps;
                return stepcert::order_study(p, m, stepcert::step_ladder{n0, q.ratio > 0.0 ? q.ratio : 2.0, q.levels}, opt);
            } else {
                return stepcert::order_study(p, m, stepcert::tolerance_ladder{q.coarsest_tolerance, q.ratio > 0.0 ? q.ratio : 10.0, q.levels},
                                             opt);
            }
        },
        problem, method);
    deliver(study_text(result, q.format), q.output);
    return 0;
}

} // namespace stepcert_cli
