#pragma once
// The stage equations of one implicit Runge–Kutta step and their simplified Newton iteration,
// shared by the fixed-step and the adaptive implicit tableau steppers. Unknowns are the stage
// increments z_i = Y_i - y:  z_i = h sum_j a_ij f(t + c_i h, y + z_j). The iteration matrix
// uses one Jacobian J at (t, y) per step and one LU (Eigen's partial-pivoting LU):
//   fully implicit A: all stages at once, (I - h A (x) J) dZ = -Z + h (A (x) I) F(Z);
//   diagonally implicit A (a_ij = 0 for j > i): stage by stage, (I - h a_ii J) dz_i = ...,
//   one LU per distinct a_ii (one for SDIRK), explicit stages (a_ii = 0) evaluated directly.
// The new solution is formed from the increments, y + sum_i d_i z_i with d = A^(-T) b, not from
// f at the stages: on stiff problems f(Y_i) multiplies the Newton error by the stiffness
// (E. Hairer, G. Wanner, Solving ODEs II, §IV.8 — from memory). Diagonally implicit tableaus
// recover f(Y_i) = (z_i - h sum_{j<i} a_ij f_j) / (h a_ii) instead, the same thing stage by stage.
// Convergence: with the contraction rate theta_k = |dZ_k| / |dZ_(k-1)|, stop when
// theta_k / (1 - theta_k) |dZ_k| <= tolerance (the distance to the fixed point of a contraction;
// common practice, no source); theta >= 1 is divergence unless the increment already sits at
// round-off. Every iteration is bounded (max_iterations; the run driver's evaluation budget).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <sstream>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

#include <Eigen/Dense>
#include <boost/math/special_functions/fpclassify.hpp>
#include <boost/multiprecision/eigen.hpp>  // Eigen with Boost.Multiprecision scalars

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/derivative_sources.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

/// How the simplified Newton iteration of an implicit step is run.
struct newton_settings {
    int max_iterations = 0;  ///< per stage system; 0: 10 + 2 * digits10 of the scalar (double: 40)
};

namespace detail {

/// d with A^T d = b, in the tableau's own type (exact for rationals); empty when A is singular.
template <class C>
std::optional<std::vector<C>> weights_on_increments(const std::vector<std::vector<C>>& a, std::vector<C> rhs) {
    const std::size_t s = rhs.size();
    std::vector<std::vector<C>> m(s, std::vector<C>(s));
    for (std::size_t i = 0; i < s; ++i)
        for (std::size_t j = 0; j < s; ++j) m[i][j] = a[j][i];
    for (std::size_t col = 0; col < s; ++col) {
        std::size_t pivot = col;
        for (std::size_t r = col + 1; r < s; ++r)
            if (abs_value(m[r][col]) > abs_value(m[pivot][col])) pivot = r;
        if (m[pivot][col] == 0) return std::nullopt;
        std::swap(m[pivot], m[col]);
        std::swap(rhs[pivot], rhs[col]);
        for (std::size_t r = col + 1; r < s; ++r) {
            const C factor = m[r][col] / m[col][col];
            for (std::size_t j = col; j < s; ++j) m[r][j] -= factor * m[col][j];
            rhs[r] -= factor * rhs[col];
        }
    }
    std::vector<C> d(s);
    for (std::size_t i = s; i-- > 0;) {
        C sum = rhs[i];
        for (std::size_t j = i + 1; j < s; ++j) sum -= m[i][j] * d[j];
        d[i] = sum / m[i][i];
    }
    return d;
}

enum class newton_end { converged, diverged, too_many_iterations, non_finite_start, non_finite_iterate, singular };

/// How one step's stage iteration ended, for the caller's decision and message.
template <class U>
struct newton_record {
    newton_end end = newton_end::converged;
    int iterations = 0;        ///< of the system that ended the step (all of them when converged)
    int max_iterations = 0;
    U rate = U(0);             ///< last contraction rate theta
    U increment = U(0);        ///< last increment, in the iteration's weighted norm
    std::size_t stage = 0;     ///< the stage (diagonally implicit) or 0 (all stages at once)
};

/// What the iteration's tolerance is measured against: weights w_i = atol + rtol |y_i|.
struct newton_scale {
    double atol;       ///< < 0: relative to the state, w_i = |y_i| + 1e-6 |y|_inf (fixed steps)
    double rtol;
    double tolerance;  ///< in the weighted max-norm; fixed steps: 10 eps (round-off)
};

template <class S, class Jacobian>
class implicit_stages {
public:
    using U = scalar_of<S>;
    using matrix = Eigen::Matrix<U, Eigen::Dynamic, Eigen::Dynamic>;
    using vector = Eigen::Matrix<U, Eigen::Dynamic, 1>;

    template <class C>
    implicit_stages(const tableau<C>& tab, std::size_t n, const Jacobian& jac, newton_settings settings, std::string_view label)
        : n_(n), s_(tab.stages()), jacobian_(&jac), label_(label), y_stage_(state_traits<S>::make(n)),
          f_stage_(state_traits<S>::make(n)) {
        tab.validate_shape();
        diagonal_ = true;
        for (std::size_t i = 0; i < s_; ++i) {
            std::vector<U> row;
            for (std::size_t j = 0; j < s_; ++j) {
                row.push_back(static_cast<U>(tab.a[i][j]));
                if (j > i && tab.a[i][j] != 0) diagonal_ = false;
            }
            a_.push_back(std::move(row));
            b_.push_back(static_cast<U>(tab.b[i]));
            c_.push_back(static_cast<U>(tab.c[i]));
            if (tab.b_embedded) e_.push_back(static_cast<U>(tab.b[i] - (*tab.b_embedded)[i]));
        }
        if (!diagonal_) {
            const auto d = weights_on_increments(tab.a, tab.b);
            if (!d)
                throw unsupported_operation("stepcert: implicit method '" + std::string(label) + "': tableau '" + tab.name +
                                            "' is fully implicit with a singular A; the stages cannot be solved as one "
                                            "system. Only tableaus with an invertible A, or diagonally implicit ones, are supported.");
            for (const C& x : *d) d_.push_back(static_cast<U>(x));
            if (tab.b_embedded) {
                std::vector<C> diff;
                for (std::size_t i = 0; i < s_; ++i) diff.push_back(tab.b[i] - (*tab.b_embedded)[i]);
                const auto de = weights_on_increments(tab.a, diff);  // A is invertible (above)
                for (const C& x : *de) de_.push_back(static_cast<U>(x));
            }
        }
        max_iterations_ = settings.max_iterations > 0 ? settings.max_iterations
                                                      : 10 + 2 * std::numeric_limits<U>::digits10;
        J_ = matrix::Zero(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
    }

    bool diagonally_implicit() const { return diagonal_; }
    bool has_error_estimate() const { return !e_.empty(); }

    /// One step from (t, y) with step h: y_new (and err = the embedded difference, when err is
    /// given and the tableau has one). y_new is left untouched unless the iteration converged.
    template <class Rhs, class T>
    newton_record<U> step(Rhs& rhs, const S& y, const T& t, const T& h, S& y_new, S* err, const newton_scale& scale) {
        evaluate_jacobian(rhs, y, t);
        set_weights(y, scale);
        newton_record<U> rec;
        rec.max_iterations = max_iterations_;
        if (diagonal_)
            solve_stage_by_stage(rhs, y, t, h, scale, rec);
        else
            solve_all_stages(rhs, y, t, h, scale, rec);
        if (rec.end != newton_end::converged) return rec;
        const auto N = static_cast<Eigen::Index>(n_);
        vector sum = vector::Zero(N), err_sum = vector::Zero(N);
        const U hu = static_cast<U>(h);
        for (std::size_t i = 0; i < s_; ++i) {
            if (diagonal_) {
                sum += (hu * b_[i]) * F_.segment(block(i), N);
                if (err != nullptr && !e_.empty()) err_sum += (hu * e_[i]) * F_.segment(block(i), N);
            } else {
                sum += d_[i] * Z_.segment(block(i), N);
                if (err != nullptr && !de_.empty()) err_sum += de_[i] * Z_.segment(block(i), N);
            }
        }
        for (std::size_t k = 0; k < n_; ++k) y_new[k] = y[k] + sum[static_cast<Eigen::Index>(k)];
        if (err != nullptr && !e_.empty() && diagonal_ && last_diagonal_ != U(0)) {
            // The embedded difference of an L-stable pair is not damped on stiff components: it is
            // filtered through (I - h gamma J)^(-1), the LU already at hand (L. F. Shampine, SIAM J. Sci.
            // Stat. Comput. 1 (1980) 103–118; Hairer & Wanner II, §IV.8 — from memory).
            err_sum = diagonal_lu(hu, last_diagonal_).solve(err_sum);
        }
        if (err != nullptr && !e_.empty())
            for (std::size_t k = 0; k < n_; ++k) (*err)[k] = err_sum[static_cast<Eigen::Index>(k)];
        return rec;
    }

    /// The failure of a fixed step in words, with the figures and the next step.
    static std::string failure_text(std::string_view label, const newton_record<U>& rec, double t, double h) {
        std::ostringstream os;
        os.precision(6);
        os << "stepcert: implicit method '" << label << "': the step at t = " << t << " with h = " << h << " failed: ";
        switch (rec.end) {
        case newton_end::singular:
            os << "the iteration matrix I - h (A x J) is singular there (its LU solve gave non-finite values); 1/(h a) "
                  "is an eigenvalue of the Jacobian for some eigenvalue a of A. Take another step size, or check the Jacobian.";
            break;
        case newton_end::non_finite_iterate:
            os << "the simplified Newton iteration left the region where the right-hand side is finite (iteration "
               << rec.iterations << ", stage " << rec.stage << "). Take more steps (a smaller h).";
            break;
        case newton_end::diverged:
            os << "the simplified Newton iteration diverges (stage " << rec.stage << ", increments grew by a factor "
               << static_cast<double>(rec.rate) << " at iteration " << rec.iterations
               << "): the step is too long for a Jacobian frozen at its start. Take more steps (a smaller h).";
            break;
        default:
            os << "the simplified Newton iteration did not converge in " << rec.max_iterations << " iterations (stage "
               << rec.stage << ", contraction rate " << static_cast<double>(rec.rate)
               << "). Take more steps (a smaller h), or raise newton_settings::max_iterations.";
            break;
        }
        return os.str();
    }

private:
    Eigen::Index block(std::size_t i) const { return static_cast<Eigen::Index>(i * n_); }

    template <class Rhs, class T>
    void evaluate_jacobian(Rhs& rhs, const S& y, const T& t) {
        const auto N = static_cast<Eigen::Index>(n_);
        if constexpr (std::is_same_v<Jacobian, jacobian_by_differences>) {
            using std::abs;
            using std::cbrt;
            const U root3_eps = cbrt(std::numeric_limits<U>::epsilon());
            S plus = y, minus = y, f_plus = state_traits<S>::make(n_), f_minus = state_traits<S>::make(n_);
            for (std::size_t j = 0; j < n_; ++j) {
                const U delta = root3_eps * std::max(U(1), U(abs(y[j])));
                plus[j] = y[j] + delta;
                minus[j] = y[j] - delta;
                rhs(static_cast<const S&>(plus), f_plus, t);
                rhs(static_cast<const S&>(minus), f_minus, t);
                for (std::size_t i = 0; i < n_; ++i)
                    J_(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = (f_plus[i] - f_minus[i]) / (plus[j] - minus[j]);
                plus[j] = y[j];
                minus[j] = y[j];
            }
        } else {
            J_.setZero(N, N);  // a Jacobian may write only its nonzero entries
            (*jacobian_)(y, t, J_);
            if (J_.rows() != N || J_.cols() != N)
                throw invalid_input("stepcert: implicit method '" + std::string(label_) + "': the Jacobian given with the problem "
                                    "resized its matrix to " + std::to_string(J_.rows()) + " x " + std::to_string(J_.cols()) +
                                    "; write the n x n entries J(i, j) = df_i/dy_j only.");
        }
        jacobian_finite_ = J_.allFinite();
        if constexpr (!std::is_same_v<Jacobian, jacobian_by_differences>) {
            if (!jacobian_finite_) {
                for (Eigen::Index i = 0; i < N; ++i)
                    for (Eigen::Index j = 0; j < N; ++j)
                        if (!(boost::math::isfinite)(J_(i, j))) {
                            std::ostringstream os;
                            os << "stepcert: implicit method '" << label_ << "': the Jacobian given with the problem has a NaN or "
                               << "infinite entry (" << i << ", " << j << ") at t = " << static_cast<double>(t)
                               << "; check it there (it must be df_" << i << "/dy_" << j << ").";
                            throw non_finite_value(os.str());
                        }
            }
        }
        lu_h_ = U(0);  // the factorizations belong to the old Jacobian
        lu_diagonal_.clear();
        diagonal_singular_.clear();
    }

    void set_weights(const S& y, const newton_scale& scale) {
        using std::abs;
        w_.resize(static_cast<Eigen::Index>(n_));
        y_abs_.resize(static_cast<Eigen::Index>(n_));
        for (std::size_t i = 0; i < n_; ++i) {
            const auto k = static_cast<Eigen::Index>(i);
            y_abs_[k] = abs(y[i]);
            w_[k] = scale.atol < 0 ? U(0) : U(scale.atol) + U(scale.rtol) * y_abs_[k];
        }
    }

    /// Weights for the round-off test and the fixed-step tolerance: relative to the larger of
    /// |y_i| and the stage increments' |z_i| (a state that starts at zero has only the latter),
    /// plus 1e-6 of the largest of them all.
    void round_off_weights(const vector& Z) {
        using std::abs;
        const auto N = static_cast<Eigen::Index>(n_);
        w_round_ = y_abs_;
        for (Eigen::Index k = 0; k < Z.size(); ++k) w_round_[k % N] = std::max(w_round_[k % N], U(y_abs_[k % N] + abs(Z[k])));
        const U floor = U(1e-6) * w_round_.maxCoeff() + (std::numeric_limits<U>::min)();
        for (Eigen::Index k = 0; k < N; ++k) w_round_[k] += floor;
    }

    /// Weighted max-norm of a stacked vector of stage increments.
    U norm(const vector& v, const vector& w) const {
        using std::abs;
        U m = U(0);
        for (Eigen::Index k = 0; k < v.size(); ++k) m = std::max(m, U(abs(v[k]) / w[k % static_cast<Eigen::Index>(n_)]));
        return m;
    }

    /// f at y + z for one stage into F_.segment(i); false when a value is NaN or infinite.
    template <class Rhs, class T>
    bool evaluate_stage(Rhs& rhs, const S& y, const vector& z, const T& t, const T& h, std::size_t i) {
        for (std::size_t k = 0; k < n_; ++k) y_stage_[k] = y[k] + z[static_cast<Eigen::Index>(k)];
        rhs(static_cast<const S&>(y_stage_), f_stage_, static_cast<T>(t + static_cast<T>(c_[i]) * h));
        bool finite = true;
        for (std::size_t k = 0; k < n_; ++k) {
            F_[block(i) + static_cast<Eigen::Index>(k)] = f_stage_[k];
            finite = finite && (boost::math::isfinite)(f_stage_[k]);
        }
        return finite;
    }

    /// One contraction test after an increment of weighted size inc; returns true when done
    /// (converged or failed: rec says which).
    bool judge(const U& inc, const U& round_inc, U& previous, int k, const newton_scale& scale, newton_record<U>& rec) {
        const U eps = std::numeric_limits<U>::epsilon();
        rec.iterations = k + 1;
        rec.increment = inc;
        if (!(boost::math::isfinite)(inc)) {
            rec.end = newton_end::singular;
            return true;
        }
        if (k > 0) {
            const U theta = previous > U(0) ? U(inc / previous) : U(0);
            rec.rate = theta;
            if (theta >= U(1)) {
                // Increments no longer shrink: done if they sit at round-off, diverging otherwise.
                rec.end = round_inc <= U(1000) * eps ? newton_end::converged : newton_end::diverged;
                return true;
            }
            if (theta / (U(1) - theta) * inc <= U(scale.tolerance) || round_inc <= U(4) * eps) {
                rec.end = newton_end::converged;
                return true;
            }
        } else if (round_inc <= U(4) * eps) {
            rec.end = newton_end::converged;
            return true;
        }
        previous = inc;
        if (k + 1 >= max_iterations_) {
            rec.end = newton_end::too_many_iterations;
            return true;
        }
        return false;
    }

    template <class Rhs, class T>
    void solve_all_stages(Rhs& rhs, const S& y, const T& t, const T& h, const newton_scale& scale, newton_record<U>& rec) {
        const auto N = static_cast<Eigen::Index>(n_), SN = static_cast<Eigen::Index>(s_ * n_);
        const U hu = static_cast<U>(h);
        // A differenced Jacobian that is not finite: f is not finite near y (the driver locates it).
        if (!jacobian_finite_) return (void)(rec.end = newton_end::non_finite_start);
        if (lu_h_ != hu) {
            matrix M = matrix::Identity(SN, SN);
            for (std::size_t i = 0; i < s_; ++i)
                for (std::size_t j = 0; j < s_; ++j)
                    if (a_[i][j] != U(0)) M.block(block(i), block(j), N, N) -= (hu * a_[i][j]) * J_;
            lu_full_.compute(M);
            lu_h_ = hu;
            full_singular_ = nearly_singular(lu_full_, norm1(M));
        }
        if (full_singular_) return (void)(rec.end = newton_end::singular);
        Z_ = vector::Zero(SN);
        F_.resize(SN);
        vector G(SN), dZ(SN);
        U previous = U(0);
        for (int k = 0;; ++k) {
            for (std::size_t i = 0; i < s_; ++i)
                if (!evaluate_stage(rhs, y, vector(Z_.segment(block(i), N)), t, h, i)) {
                    rec.iterations = k;
                    rec.stage = i;
                    rec.end = k == 0 ? newton_end::non_finite_start : newton_end::non_finite_iterate;
                    return;
                }
            for (std::size_t i = 0; i < s_; ++i) {
                G.segment(block(i), N) = -Z_.segment(block(i), N);
                for (std::size_t j = 0; j < s_; ++j)
                    if (a_[i][j] != U(0)) G.segment(block(i), N) += (hu * a_[i][j]) * F_.segment(block(j), N);
            }
            dZ = lu_full_.solve(G);
            Z_ += dZ;
            round_off_weights(Z_);
            const U round_inc = norm(dZ, w_round_);
            if (judge(scale.atol < 0 ? round_inc : norm(dZ, w_), round_inc, previous, k, scale, rec)) return;
        }
    }

    /// Singular to working precision: M = I - h (A x J) is the identity plus a correction, so it
    /// is singular when |M^(-1)|_1 = 1 / (rcond |M|_1) exceeds 1 / (100 eps), or rcond itself is
    /// below 100 eps (a 1 x 1 matrix has rcond 1 however small it is).
    static bool nearly_singular(const Eigen::PartialPivLU<matrix>& lu, const U& norm1) {
        const U r = lu.rcond(), limit = U(100) * std::numeric_limits<U>::epsilon();
        return !(r > limit) || !(r * norm1 > limit);
    }
    bool diagonal_is_singular(const U& aii) const {
        for (std::size_t k = 0; k < lu_diagonal_.size(); ++k)
            if (lu_diagonal_[k].first == aii) return diagonal_singular_[k];
        return false;
    }
    static U norm1(const matrix& M) { return M.cwiseAbs().colwise().sum().maxCoeff(); }

    const Eigen::PartialPivLU<matrix>& diagonal_lu(const U& hu, const U& aii) {
        for (auto& [key, lu] : lu_diagonal_)
            if (key == aii) return lu;
        const auto N = static_cast<Eigen::Index>(n_);
        matrix M = matrix::Identity(N, N) - (hu * aii) * J_;
        lu_diagonal_.emplace_back(aii, Eigen::PartialPivLU<matrix>(M));
        diagonal_singular_.emplace_back(nearly_singular(lu_diagonal_.back().second, norm1(M)));
        return lu_diagonal_.back().second;
    }

    template <class Rhs, class T>
    void solve_stage_by_stage(Rhs& rhs, const S& y, const T& t, const T& h, const newton_scale& scale, newton_record<U>& rec) {
        const auto N = static_cast<Eigen::Index>(n_);
        const U hu = static_cast<U>(h);
        F_.resize(static_cast<Eigen::Index>(s_ * n_));
        if (lu_h_ != hu) {
            lu_diagonal_.clear();
            diagonal_singular_.clear();
            lu_h_ = hu;
        }
        vector explicit_part(N), z(N), g(N), dz(N);
        for (std::size_t i = 0; i < s_; ++i) {
            explicit_part.setZero();
            for (std::size_t j = 0; j < i; ++j)
                if (a_[i][j] != U(0)) explicit_part += (hu * a_[i][j]) * F_.segment(block(j), N);
            z = explicit_part;
            rec.stage = i;
            if (a_[i][i] == U(0)) {  // an explicit stage
                if (!evaluate_stage(rhs, y, z, t, h, i)) return (void)(rec.end = newton_end::non_finite_start);
                continue;
            }
            if (!jacobian_finite_) return (void)(rec.end = newton_end::non_finite_start);
            const auto& lu = diagonal_lu(hu, a_[i][i]);
            if (diagonal_is_singular(a_[i][i])) return (void)(rec.end = newton_end::singular);
            last_diagonal_ = a_[i][i];
            U previous = U(0);
            for (int k = 0;; ++k) {
                if (!evaluate_stage(rhs, y, z, t, h, i)) {
                    rec.iterations = k;
                    rec.end = k == 0 ? newton_end::non_finite_start : newton_end::non_finite_iterate;
                    return;
                }
                g = -z + explicit_part + (hu * a_[i][i]) * F_.segment(block(i), N);
                dz = lu.solve(g);
                z += dz;
                round_off_weights(z);
                const U round_inc = norm(dz, w_round_);
                if (judge(scale.atol < 0 ? round_inc : norm(dz, w_), round_inc, previous, k, scale, rec)) break;
            }
            if (rec.end != newton_end::converged) return;
            // f at the converged stage, from the stage equation (no evaluation, no Newton error times J).
            F_.segment(block(i), N) = (z - explicit_part) / (hu * a_[i][i]);
        }
    }

    std::size_t n_, s_;
    const Jacobian* jacobian_;
    std::string_view label_;
    bool diagonal_ = true;
    int max_iterations_ = 40;
    std::vector<std::vector<U>> a_;
    std::vector<U> b_, c_, e_, d_, de_;
    matrix J_;
    bool jacobian_finite_ = true;
    U lu_h_ = U(0);
    Eigen::PartialPivLU<matrix> lu_full_;
    bool full_singular_ = false;
    U last_diagonal_ = U(0);
    std::vector<std::pair<U, Eigen::PartialPivLU<matrix>>> lu_diagonal_;
    std::vector<bool> diagonal_singular_;
    vector Z_, F_, w_, w_round_, y_abs_;
    S y_stage_, f_stage_;
};

} // namespace detail
} // namespace stepcert
