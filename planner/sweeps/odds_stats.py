"""Statistics of sampled plans: percentiles with their sampling error, chances, first-order
sensitivity indices, and the fan of flow and temperature over time.

Percentiles.  The samples' values sorted, x(1) <= ... <= x(N); the p-quantile at the rank N p + 1/2
between neighbours (Hazen's plotting position [1]), clamped to the first and last value.  A sample
that did not finish counts as +inf (it is never dropped): a percentile that reaches such a sample is
+inf, shown as "beyond" and written as null in JSON.

Sampling error.  The N points are ``R`` independently scrambled Sobol sets of N/R points
(randomised quasi-Monte Carlo [2]); each figure is worked out on every set alone, and its standard
error is the standard deviation of the R values over sqrt(R) (Owen's replicate estimate [2]).  With
R = 4 it has 3 degrees of freedom: a 95 % band is 3.18 errors (Student's t), not 1.96.

Sensitivity.  First-order Sobol' indices S_i = Var(E[Y | X_i]) / Var(Y) from the same samples, by the
given-data estimator of Plischke, Borgonovo & Smith [3]: the samples are put into M equiprobable bins of
each input (M = 2^floor(log2 sqrt(N)): 8 bins at 128 samples; the Sobol points fill each bin evenly) and
S_i is the correlation ratio of Y on the bins, with Kelley's epsilon-squared correction for the bins'
own scatter [4] (an input with no effect gives about 0 instead of (M-1)/(N-1)), cut at 0.  It costs no
plans beyond the samples.  When some samples did not finish, Y is the rank of the total time (the
unfinished ones tie last).  Tested on the Ishigami function against its published indices [5].

References
----------
[1] Hyndman, R. J. & Fan, Y., "Sample quantiles in statistical packages", The American Statistician
    50(4), 361-365, 1996 (definition 5).
[2] Owen, A. B., "Scrambling Sobol' and Niederreiter-Xing points", Journal of Complexity 14, 466-489,
    1998; L'Ecuyer, P. & Lemieux, C., "Recent advances in randomized quasi-Monte Carlo methods", 2002.
[3] Plischke, E., Borgonovo, E. & Smith, C. L., "Global sensitivity measures from given data", European
    Journal of Operational Research 226(3), 536-550, 2013.
[4] Kelley, T. L., "An unbiased correlation ratio measure", PNAS 21(9), 554-559, 1935.
[5] Saltelli, A. et al., Global Sensitivity Analysis: The Primer, Wiley, 2008 (Ishigami function,
    a = 7, b = 0.1: S1 = 0.314, S2 = 0.442, S3 = 0).
"""

from __future__ import annotations

import math

import numpy as np

PERCENTILES = (("p10", 0.10), ("p50", 0.50), ("p90", 0.90))
FAN_POINTS = 41          # times on the fan's common grid


def percentile(values, p: float) -> float:
    """The p-quantile (Hazen) of ``values``; +inf when it reaches a value that is +inf.

    >>> percentile([1.0, 2.0, 3.0, 4.0], 0.5), percentile([1.0, 2.0, math.inf, math.inf], 0.9)
    (2.5, inf)
    """
    x = np.sort(np.asarray(values, dtype=float))
    n = len(x)
    if n == 0:
        return math.nan
    rank = min(max(n * p + 0.5, 1.0), float(n))
    low = int(math.floor(rank)) - 1
    frac = rank - (low + 1)
    if frac == 0.0 or low + 1 >= n:
        return float(x[low])
    a, b = x[low], x[low + 1]
    if not (math.isfinite(a) and math.isfinite(b)):
        return math.inf
    return float(a + (b - a) * frac)


def replicate_error(parts: list[float]) -> float | None:
    """Standard error of a figure from its values on the R scrambles alone (None when one is +inf)."""
    if len(parts) < 2 or not all(math.isfinite(v) for v in parts):
        return None
    return float(np.std(parts, ddof=1) / math.sqrt(len(parts)))


def split(values, scrambles: int) -> list[np.ndarray]:
    """The values of each scramble (the samples come scramble after scramble)."""
    return np.array_split(np.asarray(values, dtype=float), scrambles)


def figure_statistics(values, scrambles: int) -> tuple[dict, dict]:
    """``({p10, p50, p90}, {p10, p50, p90} standard errors)`` of one figure's sampled values."""
    parts = split(values, scrambles)
    levels = {key: percentile(values, p) for key, p in PERCENTILES}
    errors = {key: replicate_error([percentile(part, p) for part in parts]) for key, p in PERCENTILES}
    return levels, errors


def chance(flags, scrambles: int) -> tuple[float, float | None]:
    """The share of True among ``flags`` and its standard error over the scrambles."""
    flags = np.asarray(flags, dtype=float)
    return float(flags.mean()), replicate_error([float(part.mean()) for part in split(flags, scrambles)])


def bin_count(samples: int) -> int:
    """Equiprobable bins per input: the power of two nearest below sqrt(samples), at least 2."""
    return max(2, 2 ** int(math.floor(math.log2(math.sqrt(samples)))))


def first_order_indices(u, y) -> list[float]:
    """First-order indices of ``y`` (N values) on each column of ``u`` (N x d points in [0, 1)), by the
    binned correlation ratio with Kelley's correction (module docstring)."""
    u = np.asarray(u, dtype=float)
    y = np.asarray(y, dtype=float)
    if not np.all(np.isfinite(y)):
        from scipy.stats import rankdata

        y = rankdata(np.where(np.isfinite(y), y, np.inf))
    n = len(y)
    bins = bin_count(n)
    total = float(np.sum((y - y.mean()) ** 2))
    if total <= 0.0 or n <= bins:
        return [0.0] * u.shape[1]
    out = []
    for j in range(u.shape[1]):
        index = np.minimum((u[:, j] * bins).astype(int), bins - 1)
        counts = np.bincount(index, minlength=bins)
        sums = np.bincount(index, weights=y, minlength=bins)
        filled = counts > 0
        means = sums[filled] / counts[filled]
        within = total - float(np.sum(counts[filled] * (means - y.mean()) ** 2))
        epsilon2 = 1.0 - (within / (n - filled.sum())) / (total / (n - 1))
        out.append(max(0.0, float(epsilon2)))
    return out


def sensitivity(u, y, names: list[str]) -> list[dict]:
    """``[{input, share}]`` largest first: each input's first-order index of ``y``."""
    shares = first_order_indices(u, y)
    rows = [{"input": name, "share": share} for name, share in zip(names, shares)]
    return sorted(rows, key=lambda r: -r["share"])


def fan(series: list[dict | None], end_s: float) -> dict:
    """P10/P50/P90 of the flow and of the product at the line's outlet against the time from the first
    pumped increment, on ``FAN_POINTS`` common times from 0 to ``end_s``.  After a sample's last
    increment its flow is 0 (moved, or stopped) and its temperature no longer counts; ``running`` is the
    number of samples still pumping at each time."""
    grid = np.linspace(0.0, end_s, FAN_POINTS) if end_s > 0.0 else np.zeros(1)
    flows, temps = [], []
    for s in series:
        if not s or not s["time_s"]:
            flows.append(np.zeros_like(grid))
            temps.append(np.full_like(grid, np.nan))
            continue
        t = np.append(s["time_s"], s["end_s"])
        inside = grid <= s["end_s"]
        flow = np.interp(grid, t, np.append(s["flow_m3_s"], s["flow_m3_s"][-1]))
        temp = np.interp(grid, t, np.append(s["outlet_temperature_k"], s["outlet_temperature_k"][-1]))
        flows.append(np.where(inside, flow, 0.0))
        temps.append(np.where(inside, temp, np.nan))
    flows, temps = np.array(flows), np.array(temps)
    running = np.sum(np.isfinite(temps), axis=0)
    doc = {"time_s": grid.tolist(), "running": running.astype(int).tolist()}
    for key, p in PERCENTILES:
        doc.setdefault("flow_m3_s", {})[key] = np.percentile(flows, 100 * p, axis=0).tolist()
        level = [float(np.nanpercentile(col, 100 * p)) if np.isfinite(col).any() else None for col in temps.T]
        doc.setdefault("outlet_temperature_k", {})[key] = level
    return doc
