#!/usr/bin/env python3
"""Independent reference figures for the wider family of models on the Columbus data (49 areas).

    python3 scripts/reference/family.py > test/golden/family.json

numpy and scipy only, dense matrices throughout; the readers, the weights and the lag and error
likelihoods come from columbus.py beside this file (the same independent reference, no engine
code). Model CRIME ~ constant + INC + HOVAL; WX = the neighbours' averages of INC and HOVAL. Two
row-standardised weights, as in columbus.py: queen contiguity (top level) and 4 nearest neighbours
(`knn4`). For each:

- SLX (least squares on [X, WX]);
- spatial Durbin and Durbin error (ML: the lag and error likelihoods of columbus.py on [X, WX]);
- the lag-and-error model (ML over (rho, lambda): scipy.optimize.minimize, L-BFGS-B within the
  admissible box, from a 41 x 41 grid's best point, then the root of the analytic gradient; exact
  dense log-determinants; the full information matrix from dense G and H);
- the lag model by two-stage least squares, written directly (projection on H = [X, WX, W^2 X]);
- the impacts of the lag-and-error model and of the lag model by instruments, from a dense inverse
  (I - rho W)^-1 (delta-method standard errors beside them);
- the error model by generalised moments robust to heteroskedasticity: a transcription of the
  moment conditions of Kelejian & Prucha (2010) and Arraiz, Drukker, Kelejian & Prucha (2010) with
  dense A1, A2 and Sigma.

Diagnostics (gradients at the optimum, numeric Hessians against the information matrices) go to
stderr; the JSON goes to stdout. Floats rounded to 12 significant digits.
"""
import json
import math
import sys
from pathlib import Path

import numpy as np
from scipy import optimize, stats

sys.path.insert(0, str(Path(__file__).resolve().parent))
import columbus as ref  # noqa: E402  (the independent reference's readers and ML fits)

log = ref.log


def lagged_design(X, names, W):
    """[X, WX] with WX for every column but the constant, named "neighbours' average of NAME"."""
    WX = W @ X[:, 1:]
    return np.column_stack([X, WX]), names + [f"neighbours' average of {c}" for c in names[1:]]


def lr(general, restricted, df):
    return ref.chi2_test(2 * (general - restricted), df)


# ------------------------------------------------------------------------------------------------
# SLX: y = X beta + WX theta + e by least squares
# ------------------------------------------------------------------------------------------------

def slx(y, X, names, W, ols_fit):
    """Least squares on [X, WX] (Halleck Vega & Elhorst 2015). Var = s2 (Z'Z)^-1 with s2 = e'e/(n-k);
    t with n-k df. Impacts: direct = beta + theta tr(W)/n, total = beta + theta 1'W1/n (here tr W = 0,
    1'W1/n = 1), exact SEs from the covariance of (beta_r, theta_r)."""
    Z, znames = lagged_design(X, names, W)
    n, k = Z.shape
    fit = ref.ols(y, Z, znames)
    cov = fit["sigma2"] * np.linalg.inv(Z.T @ Z)
    b = fit["beta"]
    m = X.shape[1] - 1
    impacts = []
    for r in range(m):
        j, t = 1 + r, X.shape[1] + r
        direct, total = b[j], b[j] + b[t]
        d_se = math.sqrt(cov[j, j])
        i_se = math.sqrt(cov[t, t])
        t_se = math.sqrt(cov[j, j] + cov[t, t] + 2 * cov[j, t])
        p = lambda v, s: 2 * stats.t.sf(abs(v / s), n - k)
        impacts.append({"name": names[1 + r], "direct": direct, "indirect": b[t], "total": total,
                        "directSe": d_se, "indirectSe": i_se, "totalSe": t_se,
                        "directP": p(direct, d_se), "indirectP": p(b[t], i_se), "totalP": p(total, t_se)})
    return {
        "coefficients": fit["coefficients"], "r2": fit["r2"], "sigma2": fit["sigma2"],
        "logLik": fit["logLik"], "aic": fit["aic"], "bic": fit["bic"],
        "lr": lr(fit["logLik"], ols_fit["logLik"], m), "impacts": impacts,
    }


# ------------------------------------------------------------------------------------------------
# Spatial Durbin and Durbin error: the lag and error models of columbus.py on [X, WX]
# ------------------------------------------------------------------------------------------------

def durbin_impacts(names, beta, theta, rho, W, cov_block):
    """Impacts of the Durbin model (LeSage & Pace 2009, §2.7): S_r = A^-1 (beta_r I + theta_r W),
    direct = tr(S_r)/n, total = 1'S_r 1/n, indirect = total - direct. Standard errors by the delta
    method (central differences of the three figures in (beta_r, theta_r, rho), with the covariance of
    those three), for reading beside the engine's simulated ones (which on 49 areas do not settle
    near these: draws of rho near 1 make 1/(1 - rho) heavy-tailed)."""
    n = W.shape[0]
    I = np.eye(n)

    def figures(b, t, r):
        S = np.linalg.solve(I - r * W, b * I + t * W)
        d, tot = np.trace(S) / n, S.sum() / n
        return np.array([d, tot - d, tot])

    out = []
    m = len(theta)
    for r in range(m):
        point = figures(beta[1 + r], theta[r], rho)
        idx = [1 + r, len(beta) + r, len(beta) + m]  # beta_r, theta_r, rho in (beta, theta, rho)
        V = cov_block[np.ix_(idx, idx)]
        x0 = np.array([beta[1 + r], theta[r], rho])
        J = central_jacobian(figures, x0)
        se = np.sqrt(np.diag(J @ V @ J.T))
        out.append({"name": names[1 + r], "direct": point[0], "indirect": point[1], "total": point[2],
                    "directSeDelta": se[0], "indirectSeDelta": se[1], "totalSeDelta": se[2]})
    return out


def central_jacobian(f, x0):
    """Jacobian of f (returning a vector) at x0 by central differences, step 1e-6 relative."""
    cols = []
    for c in range(len(x0)):
        h = 1e-6 * max(1.0, abs(x0[c]))
        up, down = x0.copy(), x0.copy()
        up[c] += h
        down[c] -= h
        cols.append((f(*up) - f(*down)) / (2 * h))
    return np.column_stack(cols)


def lag_impacts(names, beta, rho, W, cov_beta_rho):
    """Impacts of a model whose only spillover is rho W y (the lag-and-error model, the lag model by
    instruments; LeSage & Pace 2009, §2.7 with theta = 0): S_r = (I - rho W)^-1 beta_r, by a dense
    inverse, direct = tr(S_r)/n, total = 1'S_r 1/n, indirect = total - direct. Delta-method standard
    errors from the covariance of (beta, rho) (last row and column rho), central differences."""
    n = W.shape[0]
    Ainv = np.linalg.inv(np.eye(n) - rho * W)

    def figures(b, r):
        S = b * np.linalg.inv(np.eye(n) - r * W)
        d, tot = np.trace(S) / n, S.sum() / n
        return np.array([d, tot - d, tot])

    k = len(beta)
    out = []
    for r in range(1, k):
        d, tot = beta[r] * np.trace(Ainv) / n, beta[r] * Ainv.sum() / n
        idx = [r, k]
        V = cov_beta_rho[np.ix_(idx, idx)]
        x0 = np.array([beta[r], rho])
        J = central_jacobian(figures, x0)
        se = np.sqrt(np.diag(J @ V @ J.T))
        out.append({"name": names[r], "direct": d, "indirect": tot - d, "total": tot,
                    "directSeDelta": se[0], "indirectSeDelta": se[1], "totalSeDelta": se[2]})
    return out


def durbin_models(y, X, names, W, logdet, ols_fit, lag_fit, err_fit, slx_fit, method):
    Z, znames = lagged_design(X, names, W)
    m = X.shape[1] - 1
    dlag = ref.spatial_lag(y, Z, znames, W, logdet, ols_fit)
    derr = ref.spatial_error(y, Z, znames, W, logdet, ols_fit)
    for label, model in (("durbin", dlag), ("durbinError", derr)):
        c = model.pop("_check")
        rel = np.abs(c["seHessian"] / c["seInformation"] - 1)
        log(f"[{method}] {label}: slope at optimum {c['slope']:.2e}; SE information vs numeric Hessian "
            f"(observed information), relative differences: {np.array2string(rel, precision=3)}")
    # AIC/BIC count [X, WX] and the spatial parameter (columbus.py counts k + 1 of the design it is given)
    dlag["lr"] = lr(dlag["logLik"], ols_fit["logLik"], 1 + m)
    derr["lr"] = lr(derr["logLik"], ols_fit["logLik"], 1 + m)
    dlag["lrTests"] = {"lag": lr(dlag["logLik"], lag_fit["logLik"], m),
                       "error": lr(dlag["logLik"], err_fit["logLik"], m),
                       "slx": lr(dlag["logLik"], slx_fit["logLik"], 1)}
    derr["lrTests"] = {"error": lr(derr["logLik"], err_fit["logLik"], m),
                       "slx": lr(derr["logLik"], slx_fit["logLik"], 1)}
    # covariance of (beta, theta, rho) for the impacts' delta-method SEs
    b = np.array([c["estimate"] for c in dlag["coefficients"]])
    info, _ = ref.lag_information(Z, W, b, dlag["rho"], dlag["sigma2"])
    cov = np.linalg.inv(info)
    k = X.shape[1]
    dlag["impacts"] = durbin_impacts(names, b[:k], b[k:], dlag["rho"], W, cov[:-1, :-1])
    return dlag, derr


# ------------------------------------------------------------------------------------------------
# The lag-and-error model  y = rho W y + X beta + u,  u = lambda W u + e
# ------------------------------------------------------------------------------------------------

def lag_error_log_likelihood(theta, y, X, W, logdet):
    """Full log-likelihood at (beta, rho, lambda, sigma2):
    -n/2 ln(2 pi s2) + ln|I - rho W| + ln|I - lambda W| - e'e/(2 s2), e = B(Ay - X beta)."""
    n, k = X.shape
    beta, rho, lam, s2 = theta[:k], theta[k], theta[k + 1], theta[k + 2]
    u = y - rho * (W @ y) - X @ beta
    e = u - lam * (W @ u)
    return -0.5 * n * math.log(2 * math.pi * s2) + logdet(rho) + logdet(lam) - float(e @ e) / (2 * s2)


def lag_error(y, X, names, W, logdet, ols_fit, lag_fit, err_fit, method):
    """ML lag-and-error model (Anselin 1988). Concentrated: beta(rho, lambda) = least squares of
    B A y on B X, s2 = e'e/n, Lc = -n/2 (ln 2 pi + 1) - n/2 ln s2 + ln|A| + ln|B|. Maximised by
    scipy L-BFGS-B over the admissible box from the best point of a 41 x 41 grid, then polished by
    scipy.optimize.root (hybr) on the analytic gradient (envelope theorem):
      dLc/drho = e'(B W y)/s2 - sum w/(1 - rho w),  dLc/dlambda = e'(W u)/s2 - sum w/(1 - lambda w).
    Information matrix of (beta, rho, lambda, s2) from dense G = W A^-1, H = W B^-1 (Anselin 1988;
    derived from the expected second derivatives, with Gbar = B G B^-1 kept as such):
      I_bb = (BX)'(BX)/s2, I_br = (BX)'(B G X b)/s2, I_bl = 0, I_bs = 0,
      I_rr = tr(Gbar^2) + tr(Gbar'Gbar) + (BGXb)'(BGXb)/s2, I_rl = tr(H'Gbar) + tr(H Gbar),
      I_rs = tr(Gbar)/s2, I_ll = tr(H^2) + tr(H'H), I_ls = tr(H)/s2, I_ss = n/(2 s2^2)."""
    n, k = X.shape
    I = np.eye(n)
    Wy, WX = W @ y, W @ X

    def fit_at(rho, lam):
        B = I - lam * W
        target = B @ (y - rho * Wy)
        BX = B @ X
        beta, e = ref.least_squares(BX, target)
        return beta, e, BX

    def objective(t):
        _, e, _ = fit_at(*t)
        return ref.normal_log_likelihood(float(e @ e), n, logdet(t[0]) + logdet(t[1]))

    def gradient(t):
        rho, lam = t
        beta, e, _ = fit_at(rho, lam)
        s2 = float(e @ e) / n
        u = y - rho * Wy - X @ beta
        B = I - lam * W
        return np.array([float(e @ (B @ Wy)) / s2 + logdet.derivative(rho),
                         float(e @ (W @ u)) / s2 + logdet.derivative(lam)])

    margin = 1e-6
    lo, hi = logdet.lower * (1 - margin), logdet.upper * (1 - margin)
    grid = np.linspace(lo, hi, 41)
    start = max(((a, b) for a in grid for b in grid), key=objective)
    res = optimize.minimize(lambda t: -objective(t), np.array(start), jac=lambda t: -gradient(t),
                            method="L-BFGS-B", bounds=[(lo, hi), (lo, hi)], options={"ftol": 1e-15, "gtol": 1e-12})
    root = optimize.root(gradient, res.x, method="hybr", options={"xtol": 1e-14})
    # the root when it is closer to a zero of the gradient than the bounded search's point
    rho, lam = root.x if np.linalg.norm(gradient(root.x)) < np.linalg.norm(gradient(res.x)) else res.x
    log(f"[{method}] lag-error: L-BFGS-B {res.message}; gradient root {root.success}, gradient at optimum {gradient([rho, lam])}")
    beta, e, BX = fit_at(rho, lam)
    s2 = float(e @ e) / n
    logl = objective([rho, lam])
    A, B = I - rho * W, I - lam * W
    Ainv, Binv = np.linalg.inv(A), np.linalg.inv(B)
    G, H = W @ Ainv, W @ Binv
    Gb = B @ G @ Binv
    bgxb = B @ G @ X @ beta
    q = k + 3
    info = np.zeros((q, q))
    info[:k, :k] = BX.T @ BX / s2
    info[:k, k] = info[k, :k] = BX.T @ bgxb / s2
    info[k, k] = np.trace(Gb @ Gb) + np.trace(Gb.T @ Gb) + float(bgxb @ bgxb) / s2
    info[k, k + 1] = info[k + 1, k] = np.trace(H.T @ Gb) + np.trace(H @ Gb)
    info[k, k + 2] = info[k + 2, k] = np.trace(Gb) / s2
    info[k + 1, k + 1] = np.trace(H @ H) + np.trace(H.T @ H)
    info[k + 1, k + 2] = info[k + 2, k + 1] = np.trace(H) / s2
    info[k + 2, k + 2] = n / (2 * s2 ** 2)
    cov = np.linalg.inv(info)
    se = np.sqrt(np.diag(cov))
    theta = np.concatenate([beta, [rho, lam, s2]])
    hess = ref.numeric_hessian(lambda t: lag_error_log_likelihood(t, y, X, W, logdet), theta)
    se_h = np.sqrt(np.diag(np.linalg.inv(-hess)))
    log(f"[{method}] lag-error: SE information vs numeric Hessian (observed information), relative differences "
        f"{np.array2string(np.abs(se_h / se - 1), precision=3)}")
    aic, bic = ref.information_criteria(logl, k + 2, n)
    yhat = Ainv @ (X @ beta)
    return {
        "rho": rho, "rhoSe": se[k], "lambda": lam, "lambdaSe": se[k + 1],
        "coefficients": ref.coefficient_table(names, beta, se[:k]),
        "sigma2": s2, "logLik": logl, "aic": aic, "bic": bic,
        "lr": lr(logl, ols_fit["logLik"], 2),
        "lrTests": {"lag": lr(logl, lag_fit["logLik"], 1), "error": lr(logl, err_fit["logLik"], 1)},
        "pseudoR2": ref.squared_correlation(y, yhat),
        "impacts": lag_impacts(names, beta, rho, W, cov[:k + 1, :k + 1]),
    }


# ------------------------------------------------------------------------------------------------
# The lag model by two-stage least squares
# ------------------------------------------------------------------------------------------------

def lag_iv(y, X, names, W):
    """2SLS (Kelejian & Prucha 1998): Z = [X, Wy], H = [X, WX, W^2 X] (constant not lagged),
    Zhat = H (H'H)^-1 H'Z, delta = (Zhat'Z)^-1 Zhat'y, e = y - Z delta, s2 = e'e/n,
    Var = s2 (Zhat'Zhat)^-1; robust (HC0) (Zhat'Zhat)^-1 Zhat' diag(e^2) Zhat (Zhat'Zhat)^-1.
    Written with numpy.linalg.solve on the normal equations of the two stages (a different route from
    the engine's QR)."""
    n, k = X.shape
    WX = W @ X[:, 1:]
    H = np.column_stack([X, WX, W @ WX])
    Z = np.column_stack([X, W @ y])
    Zhat = H @ np.linalg.solve(H.T @ H, H.T @ Z)
    delta = np.linalg.solve(Zhat.T @ Z, Zhat.T @ y)
    e = y - Z @ delta
    s2 = float(e @ e) / n
    bread = np.linalg.inv(Zhat.T @ Zhat)
    cov = s2 * bread
    robust = bread @ (Zhat.T * e ** 2) @ Zhat @ bread
    se, rse = np.sqrt(np.diag(cov)), np.sqrt(np.diag(robust))
    # first stage: F of the excluded instruments in the regression of Wy on H
    Wy = W @ y
    _, rh = ref.least_squares(H, Wy)
    _, rx = ref.least_squares(X, Wy)
    df1, df2 = H.shape[1] - k, n - H.shape[1]
    f = ((rx @ rx - rh @ rh) / df1) / ((rh @ rh) / df2)
    return {
        "rho": delta[k], "rhoSe": se[k], "rhoSeRobust": rse[k],
        "coefficients": ref.coefficient_table(names, delta[:k], se[:k]),
        "coefficientsRobust": ref.coefficient_table(names, delta[:k], rse[:k]),
        "sigma2": s2, "firstStage": {"stat": f, "df": df1, "df2": df2, "p": stats.f.sf(f, df1, df2)},
        "impacts": lag_impacts(names, delta[:k], delta[k], W, cov),
    }


# ------------------------------------------------------------------------------------------------
# The error model by generalised moments, robust to heteroskedasticity
# ------------------------------------------------------------------------------------------------

def error_gm(y, X, names, W, lower, upper):
    """Kelejian & Prucha (2010), Arraiz, Drukker, Kelejian & Prucha (2010), the model
    y = X beta + u, u = lambda W u + e, E e_i^2 = sigma_i^2 unknown. Dense transcription:
      A1 = W'W - diag(W'W), A2 = W (zero diagonal here);
      moments  m(lam) = gamma - Gamma [lam, lam^2]',  with u the residuals, ub = W u:
        gamma_s = u'A_s u / n,  Gamma_s = [u'(A_s + A_s')ub / n,  -ub'A_s ub / n];
      1a OLS -> u;  1b lam~ = argmin m'm;
      2a beta^ = OLS of (I - lam~ W) y on Z* = (I - lam~ W) X  ->  u^ = y - X beta^;
      2b lam^ = argmin m' Psi^-1 m (moments from u^), Psi at lam~ from e = (I - lam~ W) u^:
         psi_rs = tr[(A_r + A_r') S (A_s + A_s') S] / (2n) + a_r' S a_s / n,  S = diag(e^2),
         a_r = T alpha_r,  T = Z* (Z*'Z*/n)^-1,  alpha_r = -Z*'(A_r + A_r') e / n;
      variance at (beta^, lam^) with Psi, Z*, e recomputed at lam^ and J = Gamma [1, 2 lam^]':
         Var lam = (J' Psi^-1 J)^-1 / n,
         Var beta = P' Psi_dd P / n with P = (Z*'Z*/n)^-1, Psi_dd = Z*' S Z* / n,
         Cov(beta, lam) = P' Psi_dl Psi^-1 J (J'Psi^-1 J)^-1 / n, Psi_dl = Z*' S [a_1 a_2] / n.
    lambda is searched over the admissible range: scipy minimize_scalar (bounded) around the best of
    a 2,001-point grid."""
    n, k = X.shape
    I = np.eye(n)
    WtW = W.T @ W
    A = [WtW - np.diag(np.diag(WtW)), W - np.diag(np.diag(W))]

    def moments(u):
        ub = W @ u
        gamma = np.array([u @ a @ u for a in A]) / n
        Gamma = np.array([[u @ (a + a.T) @ ub, -(ub @ a @ ub)] for a in A]) / n
        return gamma, Gamma

    def minimise(gamma, Gamma, U):
        def q(lam):
            m = gamma - Gamma @ np.array([lam, lam * lam])
            return float(m @ U @ m)
        grid = np.linspace(lower, upper, 2001)
        i = int(np.argmin([q(t) for t in grid]))
        a, b = grid[max(0, i - 1)], grid[min(len(grid) - 1, i + 1)]
        return optimize.minimize_scalar(q, bounds=(a, b), method="bounded", options={"xatol": 1e-13}).x

    def psi_at(u, lam):
        e = u - lam * (W @ u)
        S = np.diag(e ** 2)
        Zs = X - lam * (W @ X)
        P = np.linalg.inv(Zs.T @ Zs / n)
        T = Zs @ P
        a = [T @ (-(Zs.T @ (Ar + Ar.T) @ e) / n) for Ar in A]
        psi = np.array([[np.trace((Ar + Ar.T) @ S @ (As + As.T) @ S) / (2 * n) + a[r] @ S @ a[s] / n
                         for s, As in enumerate(A)] for r, Ar in enumerate(A)])
        return psi, S, Zs, P, np.column_stack(a), e

    beta0 = np.linalg.lstsq(X, y, rcond=None)[0]
    g0, G0 = moments(y - X @ beta0)
    lam0 = minimise(g0, G0, np.eye(2))
    B0 = I - lam0 * W
    beta = np.linalg.lstsq(B0 @ X, B0 @ y, rcond=None)[0]
    u = y - X @ beta
    gamma, Gamma = moments(u)
    psi0 = psi_at(u, lam0)[0]
    lam = minimise(gamma, Gamma, np.linalg.inv(psi0))
    psi, S, Zs, P, a, e = psi_at(u, lam)
    J = Gamma @ np.array([1.0, 2 * lam])
    Pi = np.linalg.inv(psi)
    omega_ll = 1.0 / float(J @ Pi @ J)
    var_beta = P.T @ (Zs.T @ S @ Zs / n) @ P / n
    cov_bl = P.T @ (Zs.T @ S @ a / n) @ Pi @ J * omega_ll / n
    se_beta = np.sqrt(np.diag(var_beta))
    return {
        "lambda": lam, "lambdaSe": math.sqrt(omega_ll / n), "lambdaInitial": lam0,
        "coefficients": ref.coefficient_table(names, beta, se_beta),
        "covarianceBetaLambda": cov_bl.tolist(), "sigma2": float(e @ e) / n,
    }


# ------------------------------------------------------------------------------------------------
# Driver
# ------------------------------------------------------------------------------------------------

def analyse(y, X, names, neighbours, method):
    W = ref.row_standardised(neighbours)
    logdet = ref.LogDeterminant(W)
    ols_fit = ref.ols(y, X, names)
    lag_fit = ref.spatial_lag(y, X, names, W, logdet, ols_fit)
    err_fit = ref.spatial_error(y, X, names, W, logdet, ols_fit)
    for f in (lag_fit, err_fit):
        f.pop("_check")
    slx_fit = slx(y, X, names, W, ols_fit)
    dlag, derr = durbin_models(y, X, names, W, logdet, ols_fit, lag_fit, err_fit, slx_fit, method)
    slx_fit["lrTests"] = {"ols": slx_fit["lr"]}
    both = lag_error(y, X, names, W, logdet, ols_fit, lag_fit, err_fit, method)
    return {
        "slx": slx_fit, "durbin": dlag, "durbinError": derr, "lagError": both,
        "lagIV": lag_iv(y, X, names, W),
        "errorGM": error_gm(y, X, names, W, logdet.lower * (1 - 1e-6), logdet.upper * (1 - 1e-6)),
    }


def main():
    polygons = ref.read_polygons(ref.FIXTURE / "columbus.shp")
    table = ref.read_table(ref.FIXTURE / "columbus.dbf")
    n = len(polygons)
    y = np.array(table[ref.DEPENDENT])
    X = np.column_stack([np.ones(n)] + [np.array(table[c]) for c in ref.REGRESSORS])
    names = ["constant"] + [c.upper() for c in ref.REGRESSORS]
    queen = ref.queen_neighbours(polygons)
    knn = ref.nearest_neighbours([ref.ring_centroid(rings[0]) for rings in polygons], 4)
    out = {
        "source": "scripts/reference/family.py: numpy " + np.__version__ + ", scipy " + __import__("scipy").__version__ +
                  "; the Columbus fixture read and weighted by columbus.py (queen; knn4 = 4 nearest ring centroids); "
                  "CRIME ~ constant + INC + HOVAL with WX = neighbours' averages of INC and HOVAL; dense matrices, "
                  "log-determinants from all eigenvalues. "
                  f"Floats rounded to {ref.SIGNIFICANT_DIGITS} significant digits.",
        **analyse(y, X, names, queen, "queen"),
        "knn4": analyse(y, X, names, knn, "knn4"),
    }
    json.dump(ref.rounded(out), sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
