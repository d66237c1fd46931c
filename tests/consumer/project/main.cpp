// An outside project: links only stepcert::stepcert (Boost alone) and runs a method.
// Check basis: exact solution e^{-t} of y' = -y (common practice, no source).
#include <cmath>
#include <cstdio>
#include <vector>

#include <stepcert/stepcert.hpp>

int main() {
    auto p = stepcert::make_problem("cooling", [](const auto& y, auto& dydt, auto) { dydt[0] = -y[0]; },
                                    std::vector<double>{1.0}, 0.0, 1.0);
    auto run = stepcert::run_uniform(p, stepcert::classic_rk4, 64);
    const double err = std::abs(run.final_state()[0] - std::exp(-1.0));
    std::printf("consumer: RK4 error with 64 steps %.3e\n", err);
    return err < 1e-8 ? 0 : 1;
}
