// Where is the error made? The quarter-car rig (our own scenario, invented data) rolls over a
// 50 ms road bump at t = 0.5 s; we want its state at t1 = 1.5 s, after the bump, from classic
// RK4 with uniform steps. The error ledger carries each step's local error (estimated by step
// doubling) to t1 along the variational equation and adds up, window by window, where the final
// error comes from. It then suggests the step schedule that spreads the contributions evenly,
// and runs it. A 24-digit multiprecision reference checks both: the transported estimate against
// the true error, and the suggested grid's true error against the uniform one's.
//   suspension_error_ledger [--steps N] [--end T] [--windows W] [--json FILE] [--csv FILE]
// --json writes the whole ledger (stepcert.error_ledger), --csv its steps, one row per step.
#include <algorithm>
#include <cstddef>
#include <cstdio>
#include <fstream>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

#include "stepcert/estimate/effectivity.hpp"
#include "stepcert/estimate/step_doubling.hpp"
#include "stepcert/estimate/true_global_error.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/suspension_rig.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/report/estimate_caution.hpp"
#include "stepcert/report/ledger_csv.hpp"
#include "stepcert/report/ledger_json.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/transport/equidistributing_schedule.hpp"
#include "stepcert/transport/error_ledger.hpp"
#include "stepcert/transport/ledger_windows.hpp"

int main(int argc, char** argv) {
    CLI::App app{"Error ledger of the suspension rig over a road bump (RK4, uniform steps)"};
    std::size_t steps = 300;
    double end = 1.5;
    std::size_t windows = 15;
    app.add_option("--steps", steps, "uniform RK4 steps on [0, end]")->check(CLI::PositiveNumber);
    app.add_option("--end", end, "final time in seconds (the bump is centred at 0.5 s)")->check(CLI::PositiveNumber);
    app.add_option("--windows", windows, "time windows of the ledger summary")->check(CLI::PositiveNumber);
    std::string json_path, csv_path;
    app.add_option("--json", json_path, "write the ledger as JSON to this file");
    app.add_option("--csv", csv_path, "write the ledger's steps as CSV to this file");
    CLI11_PARSE(app, argc, argv);
    try {
        using namespace stepcert;
        const auto rig = problems::suspension_rig(end);
        const auto run = run_uniform(rig, classic_rk4, steps, 1);
        local_error_options local_opt;
        local_opt.keep_vectors = true;  // the transport needs the local error vectors, not only their sizes
        const local_error_profile local = step_doubling_profile(rig, classic_rk4, steps, local_opt);
        const error_ledger ledger = build_error_ledger(rig, run, local);

        std::printf("error ledger: problem '%s', %s, %zu steps of %.4g s, state wanted at t1 = %g s\n", ledger.problem.c_str(),
                    ledger.method.c_str(), steps, end / static_cast<double>(steps), end);
        std::printf("local errors: %s; transport: RK4 on the variational equation with %s\n", ledger.local_source.c_str(),
                    ledger.jacobian_how.c_str());
        std::printf("estimated global error at t1 (max norm): %.3e\n\n", ledger.final_size);
        std::printf("%-16s %6s %12s %14s %8s\n", "window [s]", "steps", "local made", "arrives at t1", "share");
        const auto table = ledger_windows(ledger, windows);
        for (const auto& w : table)
            std::printf("[%5.2f, %5.2f]   %6zu %12.3e %14.3e %7.1f%%\n", w.t_begin, w.t_end, w.step_count, w.fresh, w.contribution,
                        100.0 * w.share);
        const auto worst = std::max_element(table.begin(), table.end(),
                                            [](const auto& a, const auto& b) { return a.contribution < b.contribution; });
        std::printf("\nlargest part of the final error: [%.2f, %.2f] s, %.1f%% of it, in %.0f%% of the run\n", worst->t_begin,
                    worst->t_end, 100.0 * worst->share, 100.0 * (worst->t_end - worst->t_begin) / end);

        // Check against the truth: the 24-digit reference from the same right-hand side.
        global_error_options global_opt;
        global_opt.grid_points = std::min<std::size_t>(steps, 10);
        while (steps % global_opt.grid_points != 0) --global_opt.grid_points;
        const auto truth = true_global_error(rig, classic_rk4, steps, global_opt);
        std::vector<double> transported;
        for (std::size_t k = 1; k <= global_opt.grid_points; ++k)
            transported.push_back(ledger.steps[k * steps / global_opt.grid_points - 1].global);
        global_error_estimate estimate = truth;
        estimate.estimate = transported;
        const auto eff = effectivity(estimate, truth);
        std::printf("true global error at t1: %.3e; transported estimate / true error at %zu times: %.3f .. %.3f\n",
                    truth.estimate.back(), eff.counted, eff.smallest, eff.largest);

        const step_schedule schedule = equidistributing_schedule(ledger);
        const auto scheduled = run_on_grid(rig, classic_rk4, schedule.times);
        const auto reference = reference_solution(rig, 24, uniform_times{1});
        const double before = weighted_norm{}(run.final_state(), reference.states[0]);
        const double after = weighted_norm{}(scheduled.final_state(), reference.states[0]);
        std::printf("\nsuggested schedule, same %zu steps: h from %.3g to %.3g s\n", steps, schedule.smallest_step,
                    schedule.largest_step);
        std::printf("true error at t1: uniform %.3e, suggested %.3e (%.1fx smaller)\n", before, after, before / after);
        std::printf("(%s)\n\n", schedule.how.c_str());
        std::printf("%s\n", std::string(estimate_caution).c_str());
        auto write = [](const std::string& path, const std::string& text) {
            std::ofstream out(path);
            out << text;
            if (!out) throw invalid_input("cannot write '" + path + "'; check the folder exists and is writable.");
        };
        if (!json_path.empty()) write(json_path, to_json(ledger).dump(1) + "\n");
        if (!csv_path.empty()) write(csv_path, ledger_csv(ledger));
    } catch (const stepcert::error& e) {
        std::fprintf(stderr, "suspension_error_ledger: %s\n", e.what());
        return 1;
    }
    return 0;
}
