#pragma once
// The extreme eigenvalues of a linear operator known only by its products v -> A v (needs Eigen
// and Spectra): the largest in magnitude, the leftmost and the most oscillatory, each with a radius
// within which the true eigenvalue is taken to lie. Memory stays O(n k) for a Krylov space of
// dimension k; no n x n matrix is formed (except below krylov_dimension unknowns, where the
// Krylov space is the whole space and A is assembled from n products).
//
// Symmetric A (detected by a random-direction test, below): Lanczos without reorthogonalization
// (C. Lanczos 1950; B. N. Parlett, The Symmetric Eigenvalue Problem, 1980, ch. 13 — from memory),
// three vectors of memory and O(n) work per product. In finite precision it loses orthogonality as
// Ritz values converge, which makes duplicate ("ghost") copies of converged ones but leaves the
// extreme Ritz values accurate (C. C. Paige 1980 — from memory). The radius of a Ritz value theta
// is its Ritz residual beta_k |s_ki| (some eigenvalue lies within |A y - theta y| of theta for unit
// y: the Krylov-Weinstein bound, Parlett Thm 4.5.1 — from memory), plus the products' own error
// and the measured asymmetry. The extreme Ritz values lie inside the spectrum (interlacing), so
// theta_min - radius bounds the leftmost eigenvalue as long as the random start vector has a
// component along its eigenvector that k steps resolve: a probabilistic, not a worst-case, bound
// (no method that sees A only through products can give one).
// Measured (bench/bench_stability_large.cpp, one run): on the 10^5-cell busbar Spectra's restarted
// Lanczos (SymEigsSolver, full reorthogonalization, same residual tolerance) took 0.35 s and 164
// products per estimate, this one 0.033 s and 48 products (leftmost Ritz value 2.6e-4 from the
// closed form); Spectra's orthogonalization, O(n k^2), dominates where the right-hand side is O(n).
//
// Non-symmetric A: Spectra's implicitly restarted Arnoldi (GenEigsSolver), once for each of the
// largest magnitude, the leftmost and the most oscillatory, with the Ritz residual |A x - theta x|
// measured explicitly (two more products for a complex pair). For a non-normal A the residual
// bounds the error only times the eigenvector condition number (Bauer-Fike), which products do
// not reveal: the radius is a stated factor times the residual, at least a stated floor.
#include <algorithm>
#include <cmath>
#include <complex>
#include <concepts>
#include <cstddef>
#include <cstdint>
#include <exception>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Core>
#include <Eigen/Eigenvalues>
// GCC 12 reports a use-after-free inside Eigen's aligned_free when it inlines Spectra's
// eigenvector code (a false positive of its middle end, seen with Eigen 3.4 and Spectra 1.0.1).
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wuse-after-free"
#endif
#include <Spectra/GenEigsSolver.h>
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"

namespace stepcert {

/// Anything with size() and apply(v, out): out = A v for arrays of size() doubles.
template <class Op>
concept linear_operator = requires(Op& op, const double* v, double* out) {
    { op.size() } -> std::convertible_to<std::size_t>;
    op.apply(v, out);
};

struct extreme_eigenvalue_options {
    std::size_t max_products = 600;   ///< products per estimate; beyond it the estimate is returned unconverged
    /// An extreme Ritz value counts as converged when its error radius is at most tolerance x
    /// |theta|: symmetric, its residual (measured on the 1,000-cell busbar: the Ritz value's own
    /// error then is about 5x smaller); non-symmetric, nonsymmetric_factor x its residual.
    double tolerance = 2e-3;
    std::size_t count = 4;            ///< Ritz values kept of the largest magnitude (and leftmost)
    std::size_t krylov_dimension = 20;  ///< Arnoldi basis (non-symmetric); at most this many unknowns: assembled
    /// Treated as symmetric when |u.Aw - w.Au| <= this x (|u||Aw| + |w||Au|) for random u, w, and
    /// the Lanczos recurrence stays tridiagonal to the same level in its first steps.
    double symmetry_tolerance = 1e-6;
    /// Relative error budgeted for the products themselves (forward differences in double carry
    /// about sqrt(eps) = 1.5e-8 of rounding; the rest covers mild nonlinearity).
    double product_error = 1e-6;
    double nonsymmetric_factor = 10.0;  ///< non-symmetric: radius = factor x residual ...
    double nonsymmetric_floor = 1e-3;   ///< ... but at least floor x |theta|
    std::uint64_t seed = 0x5eedc0de;    ///< of the random start vector (results are reproducible)

    void validate(const std::string& who) const {
        if (max_products < 4) throw invalid_input(who + "max_products must be >= 4.");
        if (!(tolerance > 0.0 && tolerance < 0.5)) throw invalid_input(who + "tolerance must be in (0, 0.5).");
        if (count == 0) throw invalid_input(who + "count must be >= 1.");
        if (krylov_dimension < 2 * count + 1)
            throw invalid_input(who + "krylov_dimension must be >= 2 count + 1 (Spectra's advice for convergence).");
        if (!(symmetry_tolerance >= 0.0 && symmetry_tolerance < 1e-2) || !(product_error >= 0.0 && product_error < 1e-2) ||
            !(nonsymmetric_factor >= 1.0) || !std::isfinite(nonsymmetric_factor) || !(nonsymmetric_floor >= 0.0 && nonsymmetric_floor < 0.5))
            throw invalid_input(who + "need 0 <= symmetry_tolerance, product_error < 1e-2, a finite nonsymmetric_factor >= 1 "
                                      "and 0 <= nonsymmetric_floor < 0.5.");
    }
};

/// One estimated eigenvalue: the true one is taken to lie within radius of value.
struct estimated_eigenvalue {
    std::complex<double> value;  ///< the Ritz value
    double residual = 0.0;       ///< |A x - value x| / |x| of its Ritz vector
    double radius = 0.0;         ///< assumed error bound (see the top of the file)
    std::string role;            ///< why it was kept: "leftmost", "largest |lambda|", "most oscillatory"
};

struct extreme_eigenvalue_estimate {
    std::vector<estimated_eigenvalue> eigenvalues;
    bool symmetric = false;
    double asymmetry = 0.0;   ///< the larger of the symmetry tests' relative values
    bool converged = false;   ///< every extreme Ritz value met the tolerance within the budget
    std::size_t products = 0;
    std::string method;       ///< how, in words

    /// max |value| + radius: an upper estimate of the spectral radius.
    double spectral_radius() const {
        double r = 0.0;
        for (const auto& e : eigenvalues) r = std::max(r, std::abs(e.value) + e.radius);
        return r;
    }
};

namespace detail {

/// Uniform in [-1, 1) from a 64-bit generator, the same on every standard library.
inline std::vector<double> random_direction(std::size_t n, std::uint64_t seed) {
    std::vector<double> v(n);
    std::uint64_t s = seed;
    for (double& x : v) {
        s += 0x9e3779b97f4a7c15ULL;  // splitmix64 (S. Vigna, public domain — from memory)
        std::uint64_t z = s;
        z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
        z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
        z ^= z >> 31;
        x = static_cast<double>(z >> 11) * 0x1.0p-52 - 1.0;
    }
    return v;
}

inline double dot(const std::vector<double>& a, const std::vector<double>& b) {
    double s = 0.0;
    for (std::size_t i = 0; i < a.size(); ++i) s += a[i] * b[i];
    return s;
}

/// Keeps the count of largest magnitude, the count leftmost and (complex) the most oscillatory
/// of the candidates, merged when equal to rounding, roles joined.
inline std::vector<estimated_eigenvalue> pick_extremes(std::vector<estimated_eigenvalue> all, std::size_t count,
                                                       bool oscillatory) {
    std::vector<estimated_eigenvalue> kept;
    auto keep = [&](const estimated_eigenvalue& e, const std::string& role) {
        for (auto& k : kept)
            if (std::abs(k.value - e.value) <= 1e-12 * std::max(std::abs(k.value), std::abs(e.value))) {
                if (k.role.find(role) == std::string::npos) k.role += ", " + role;
                k.radius = std::max(k.radius, e.radius);
                return;
            }
        kept.push_back(e);
        kept.back().role = role;
    };
    auto take = [&](auto less, const std::string& role, std::size_t how_many) {
        std::sort(all.begin(), all.end(), less);
        for (std::size_t i = 0; i < std::min(how_many, all.size()); ++i) keep(all[i], role);
    };
    take([](const auto& a, const auto& b) { return a.value.real() < b.value.real(); }, "leftmost", count);
    take([](const auto& a, const auto& b) { return std::abs(a.value) > std::abs(b.value); }, "largest |lambda|", count);
    if (oscillatory)
        take([](const auto& a, const auto& b) { return std::abs(a.value.imag()) > std::abs(b.value.imag()); }, "most oscillatory", 2);
    return kept;
}

/// Below krylov_dimension unknowns: A assembled from n products, every eigenvalue exact (to the
/// products' error).
template <linear_operator Op>
extreme_eigenvalue_estimate assembled_eigenvalues(Op& op, const extreme_eigenvalue_options& opt) {
    const std::size_t n = op.size();
    const auto N = static_cast<Eigen::Index>(n);
    Eigen::MatrixXd A(N, N);
    std::vector<double> e(n, 0.0), col(n);
    for (std::size_t j = 0; j < n; ++j) {
        e[j] = 1.0;
        op.apply(e.data(), col.data());
        e[j] = 0.0;
        for (std::size_t i = 0; i < n; ++i) A(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = col[i];
    }
    extreme_eigenvalue_estimate out;
    out.products = n;
    out.symmetric = A.isApprox(A.transpose(), opt.symmetry_tolerance) || A.isZero();
    const Eigen::EigenSolver<Eigen::MatrixXd> eig(A, false);
    if (eig.info() != Eigen::Success)
        throw budget_exhausted("stepcert::estimate_extreme_eigenvalues: the eigenvalue iteration did not converge on the "
                               "assembled " + std::to_string(n) + " x " + std::to_string(n) + " operator; check its scaling.");
    std::vector<estimated_eigenvalue> all;
    const double scale = eig.eigenvalues().cwiseAbs().maxCoeff();
    for (const std::complex<double>& l : eig.eigenvalues()) all.push_back({l, 0.0, opt.product_error * scale, ""});
    out.eigenvalues = pick_extremes(std::move(all), n, true);  // all of them: there are few
    out.converged = true;
    out.method = "every eigenvalue of the operator assembled from " + std::to_string(n) + " products (n <= krylov_dimension)";
    return out;
}

template <linear_operator Op>
extreme_eigenvalue_estimate lanczos_extremes(Op& op, std::vector<double> q, std::vector<double> aq, double asymmetry,
                                             std::size_t products, const extreme_eigenvalue_options& opt) {
    const std::size_t n = op.size();
    std::vector<double> q_prev(n, 0.0), q_prev2(n, 0.0), w(n);
    std::vector<double> alpha, beta;  // T_k: diagonal alpha, off-diagonal beta[0..k-2]; beta[k-1] = |r_k|
    extreme_eigenvalue_estimate out;
    out.symmetric = true;
    out.asymmetry = asymmetry;
    const std::size_t steps_max = std::min(n, opt.max_products - std::min(opt.max_products, products) + 1);
    std::size_t next_check = std::min<std::size_t>(10, n);
    double t_norm = 0.0;
    for (std::size_t k = 1;; ++k) {
        // w = A q_k - beta_(k-1) q_(k-1) - alpha_k q_k (A q_1 is already at hand).
        if (k > 1) {
            op.apply(q.data(), aq.data());
            ++products;
        }
        if (k == 3) {  // a symmetric A keeps A q_3 orthogonal to q_1 (tridiagonal recurrence)
            const double aq_norm = std::sqrt(dot(aq, aq));
            if (aq_norm > 0.0) out.asymmetry = std::max(out.asymmetry, std::abs(dot(q_prev2, aq)) / aq_norm);
            if (out.asymmetry > opt.symmetry_tolerance) {
                out.products = products;
                return out;  // not symmetric after all: the caller turns to Arnoldi
            }
        }
        const double b_prev = beta.empty() ? 0.0 : beta.back();
        for (std::size_t i = 0; i < n; ++i) w[i] = aq[i] - b_prev * q_prev[i];
        const double a = dot(q, w);
        for (std::size_t i = 0; i < n; ++i) w[i] -= a * q[i];
        const double b = std::sqrt(dot(w, w));
        alpha.push_back(a);
        beta.push_back(b);
        t_norm = std::max(t_norm, std::abs(a) + b + b_prev);
        if (!std::isfinite(a) || !std::isfinite(b))
            throw non_finite_value("stepcert::estimate_extreme_eigenvalues: the Lanczos recurrence became NaN or infinite; "
                                   "check the operator (the right-hand side near the sampled state).");
        const bool exhausted = b <= 1e-14 * t_norm || k == steps_max;  // invariant subspace, all of R^n, or the budget
        if (k == next_check || exhausted) {
            next_check = k + std::max<std::size_t>(5, k / 4);
            const auto K = static_cast<Eigen::Index>(k);
            Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> ritz;
            const Eigen::VectorXd d = Eigen::Map<const Eigen::VectorXd>(alpha.data(), K);
            const Eigen::VectorXd s = Eigen::Map<const Eigen::VectorXd>(beta.data(), K - 1);
            ritz.computeFromTridiagonal(d, s, Eigen::ComputeEigenvectors);
            if (ritz.info() != Eigen::Success)
                throw budget_exhausted("stepcert::estimate_extreme_eigenvalues: the tridiagonal eigenvalue iteration did not "
                                       "converge; check the operator's scaling.");
            const double scale = ritz.eigenvalues().cwiseAbs().maxCoeff();
            std::vector<estimated_eigenvalue> all;
            for (Eigen::Index i = 0; i < K; ++i) {
                const double theta = ritz.eigenvalues()[i];
                const double residual = (b <= 1e-14 * t_norm ? 0.0 : b) * std::abs(ritz.eigenvectors()(K - 1, i));
                all.push_back({theta, residual, residual + (opt.product_error + out.asymmetry) * scale, ""});
            }
            // Converged: the leftmost and the largest-magnitude Ritz values meet the tolerance.
            const auto& left = all.front();
            const auto& big = *std::max_element(all.begin(), all.end(), [](const auto& x, const auto& y) {
                return std::abs(x.value) < std::abs(y.value);
            });
            const bool converged = left.residual <= opt.tolerance * std::max(std::abs(left.value), 1e-300) &&
                                   big.residual <= opt.tolerance * std::max(std::abs(big.value), 1e-300);
            if (converged || exhausted) {
                // Every eigenvalue is real and inside [lowest - r, highest + r]: a radius reaching past
                // those ends says nothing more.
                const double low = all.front().value.real() - all.front().radius;
                const double high = all.back().value.real() + all.back().radius;
                for (auto& e : all)
                    e.radius = std::min(e.radius, e.value.real() < 0.0 ? e.value.real() - low : high - e.value.real());
                out.eigenvalues = pick_extremes(std::move(all), opt.count, false);
                out.converged = converged || b <= 1e-14 * t_norm || k == n;
                out.products = products;
                out.method = "Lanczos (" + std::to_string(k) + " steps, " + std::to_string(products) +
                             " products; radius: the Ritz residual" + (out.converged ? "" : ", NOT converged within the budget") + ")";
                return out;
            }
        }
        q_prev2.swap(q_prev);
        q_prev.swap(q);
        for (std::size_t i = 0; i < n; ++i) q[i] = w[i] / b;
    }
}

/// Spectra's operator interface over a stepcert linear operator.
template <linear_operator Op>
struct spectra_operator {
    using Scalar = double;
    Op* op;
    std::size_t* products;
    Eigen::Index rows() const { return static_cast<Eigen::Index>(op->size()); }
    Eigen::Index cols() const { return rows(); }
    void perform_op(const double* x, double* y) const {
        op->apply(x, y);
        ++*products;
    }
};

/// GenEigsSolver with its Ritz pairs readable also when it has not converged.
template <class SpectraOp>
class ritz_pairs_solver : public Spectra::GenEigsBase<SpectraOp, Spectra::IdentityBOp> {
    using base = Spectra::GenEigsBase<SpectraOp, Spectra::IdentityBOp>;

public:
    ritz_pairs_solver(SpectraOp& op, Eigen::Index nev, Eigen::Index ncv) : base(op, Spectra::IdentityBOp(), nev, ncv) {}
    std::complex<double> value(Eigen::Index i) const { return this->m_ritz_val[i]; }
    Eigen::VectorXcd vector(Eigen::Index i) const { return this->m_fac.matrix_V() * this->m_ritz_vec.col(i); }
};

template <linear_operator Op>
extreme_eigenvalue_estimate arnoldi_extremes(Op& op, const std::vector<double>& start, double asymmetry, std::size_t products,
                                             const extreme_eigenvalue_options& opt) {
    const std::size_t n = op.size();
    extreme_eigenvalue_estimate out;
    out.asymmetry = asymmetry;
    out.converged = true;
    spectra_operator<Op> sop{&op, &products};
    std::vector<estimated_eigenvalue> all;
    std::vector<double> re(n), im(n), are(n), aim(n);
    struct wanted {
        Spectra::SortRule rule;
        Eigen::Index nev;
    };
    const auto nev_magn = static_cast<Eigen::Index>(std::min(opt.count, n - 2));
    for (const wanted w : {wanted{Spectra::SortRule::LargestMagn, nev_magn}, wanted{Spectra::SortRule::SmallestReal, 2},
                           wanted{Spectra::SortRule::LargestImag, 2}}) {
        const auto ncv = static_cast<Eigen::Index>(std::min<std::size_t>(n, opt.krylov_dimension));
        const std::size_t left = opt.max_products > products ? opt.max_products - products : 0;
        // Each restart costs at most ncv products, the first factorization ncv, the residuals 2 nev.
        const std::size_t cost = static_cast<std::size_t>(ncv + 2 * w.nev);
        const auto restarts = static_cast<Eigen::Index>(left > cost ? (left - cost) / static_cast<std::size_t>(ncv) : 0);
        if (left < cost) {
            out.converged = false;
            break;
        }
        ritz_pairs_solver<spectra_operator<Op>> solver(sop, w.nev, ncv);
        solver.init(start.data());
        try {
            solver.compute(w.rule, std::max<Eigen::Index>(restarts, 1), opt.tolerance / opt.nonsymmetric_factor, w.rule);
        } catch (const error&) {
            throw;
        } catch (const std::exception& e) {
            throw unsupported_operation(std::string("stepcert::estimate_extreme_eigenvalues: Spectra's Arnoldi iteration "
                                                    "failed: ") + e.what() + "; use the dense check on a smaller system.");
        }
        if (solver.info() != Spectra::CompInfo::Successful) out.converged = false;
        for (Eigen::Index i = 0; i < w.nev; ++i) {
            const std::complex<double> theta = solver.value(i);
            const Eigen::VectorXcd x = solver.vector(i);
            for (std::size_t j = 0; j < n; ++j) re[j] = x[static_cast<Eigen::Index>(j)].real(), im[j] = x[static_cast<Eigen::Index>(j)].imag();
            op.apply(re.data(), are.data());
            ++products;
            if (x.imag().squaredNorm() > 0.0) {
                op.apply(im.data(), aim.data());
                ++products;
            } else {
                std::fill(aim.begin(), aim.end(), 0.0);
            }
            double r2 = 0.0;  // |A x - theta x|^2 with x = re + i im
            for (std::size_t j = 0; j < n; ++j) {
                const std::complex<double> ax(are[j], aim[j]), xj(re[j], im[j]);
                r2 += std::norm(ax - theta * xj);
            }
            const double residual = std::sqrt(r2) / std::max(x.norm(), 1e-300);
            if (!std::isfinite(residual) || !std::isfinite(theta.real()) || !std::isfinite(theta.imag()))
                throw non_finite_value("stepcert::estimate_extreme_eigenvalues: a Ritz value or residual is NaN or infinite; "
                                       "check the operator.");
            all.push_back({theta, residual,
                           std::max(opt.nonsymmetric_factor * residual, opt.nonsymmetric_floor * std::abs(theta)) +
                               opt.product_error * std::abs(theta),
                           ""});
        }
    }
    if (all.empty())
        throw budget_exhausted("stepcert::estimate_extreme_eigenvalues: the product budget (" + std::to_string(opt.max_products) +
                               ") does not cover one Arnoldi factorization of dimension " +
                               std::to_string(std::min<std::size_t>(n, opt.krylov_dimension)) + "; raise max_products.");
    out.eigenvalues = pick_extremes(std::move(all), opt.count, true);
    out.products = products;
    out.method = "Arnoldi (Spectra GenEigsSolver, implicitly restarted, basis " +
                 std::to_string(std::min<std::size_t>(n, opt.krylov_dimension)) + ", " + std::to_string(products) +
                 " products; radius: max(" + formatted_number(opt.nonsymmetric_factor, "%.4g") + " x residual, " +
                 formatted_number(opt.nonsymmetric_floor, "%.4g") + " |theta|)" + (out.converged ? "" : ", NOT converged within the budget") + ")";
    return out;
}

} // namespace detail

/// The extreme eigenvalues of op (see the top of this file). Throws budget_exhausted only when the
/// budget does not cover one factorization; an iteration that does not converge within it returns
/// converged = false with the radii of its last Ritz values (larger, so still conservative).
template <class Op>
extreme_eigenvalue_estimate estimate_extreme_eigenvalues(Op& op, const extreme_eigenvalue_options& opt = {}) {
    static_assert(linear_operator<Op>,
                  "stepcert::estimate_extreme_eigenvalues: the operator needs size() and apply(const double* v, double* out) "
                  "writing out = A v (e.g. stepcert::jacobian_product).");
    const std::string who = "stepcert::estimate_extreme_eigenvalues: ";
    opt.validate(who);
    const std::size_t n = op.size();
    if (n == 0) throw invalid_input(who + "the operator has no unknowns.");
    if (n <= opt.krylov_dimension) return detail::assembled_eigenvalues(op, opt);
    // Symmetry: u.(A w) = w.(A u) for random u, w; A u starts the Lanczos recurrence.
    std::vector<double> u = detail::random_direction(n, opt.seed), w = detail::random_direction(n, opt.seed + 1);
    const double u_norm = std::sqrt(detail::dot(u, u));
    for (double& x : u) x /= u_norm;
    std::vector<double> au(n), aw(n);
    op.apply(u.data(), au.data());
    op.apply(w.data(), aw.data());
    const double mixed = std::abs(detail::dot(u, aw) - detail::dot(w, au));
    const double size = std::sqrt(detail::dot(aw, aw)) + std::sqrt(detail::dot(w, w)) * std::sqrt(detail::dot(au, au));
    const double asymmetry = size > 0.0 ? mixed / size : 0.0;
    if (asymmetry <= opt.symmetry_tolerance) {
        auto est = detail::lanczos_extremes(op, u, au, asymmetry, 2, opt);
        if (est.asymmetry <= opt.symmetry_tolerance) return est;
        return detail::arnoldi_extremes(op, u, est.asymmetry, est.products, opt);  // the recurrence showed it is not
    }
    return detail::arnoldi_extremes(op, u, asymmetry, 2, opt);
}

} // namespace stepcert
