#pragma once
// Helpers shared by the certification tests.
#include <cstddef>
#include <string>
#include <string_view>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/methods/method.hpp"

namespace test_certify_support {

/// A fixed-step method that declares no order (an in-house wrapper that forgot it): explicit Euler.
struct orderless_euler {
    static constexpr stepcert::step_control control = stepcert::step_control::fixed;
    std::string_view name() const { return "orderless Euler"; }
    int order() const { return 0; }
    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs& f, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        S dy = y;
        obs(y, t0);
        for (std::size_t k = 1; k <= n; ++k) {
            f(y, dy, t0 + static_cast<T>(k - 1) * h);
            for (std::size_t i = 0; i < y.size(); ++i) y[i] += h * dy[i];
            if (k % stride == 0) obs(y, t0 + static_cast<T>(k) * h);
        }
    }
};

/// The finest run the evidence of an estimated certificate needed: the run its difference was
/// measured from ("... from the run with N steps plus that run's band ..."), else the certified
/// run itself.
inline std::size_t finest_run_of_evidence(const stepcert::step_certificate& c) {
    const std::string key = "from the run with ";
    const auto at = c.basis.find(key);
    return at == std::string::npos ? c.steps : std::stoul(c.basis.substr(at + key.size()));
}

} // namespace test_certify_support
