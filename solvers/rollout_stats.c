/* rollout_stats.c — statistics of simulated episodes: running means, Student's t quantile, confidence intervals, percentiles. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A rollout's episodes are independent draws of the return, so the 95%
 * interval for its mean is mean +- t(0.975, n-1) s / sqrt(n), s the sample
 * standard deviation (Student 1908; any statistics text).  The t quantile is
 * found by bisection on the distribution function, which is written with the
 * regularised incomplete beta function evaluated by its continued fraction
 * (modified Lentz; Press, Teukolsky, Vetterling and Flannery, Numerical
 * Recipes, 3rd ed., 2007, section 6.4).
 */
#include "rollout_internal.h"

#include <math.h>

void bc__welford_add(bc__welford *w, double x)
{
    w->n++;
    w->sum += x;
    double delta = x - w->mean;
    w->mean += delta / (double)w->n;
    w->m2 += delta * (x - w->mean);
}

void bc__welford_merge(bc__welford *into, const bc__welford *part)
{
    if (part->n == 0)
        return;
    if (into->n == 0) {
        *into = *part;
        return;
    }
    double na = (double)into->n, nb = (double)part->n, n = na + nb;
    double delta = part->mean - into->mean;
    into->mean += delta * (nb / n);
    into->m2 += part->m2 + delta * delta * (na * nb / n);
    into->n += part->n;
    into->sum += part->sum;
}

/* The continued fraction of I_x(a, b), for x < (a + 1) / (a + b + 2). */
static double beta_fraction(double a, double b, double x)
{
    const double tiny = 1e-300, eps = 1e-16;
    double c = 1.0, d = 1.0 - (a + b) * x / (a + 1.0);
    if (fabs(d) < tiny)
        d = tiny;
    d = 1.0 / d;
    double h = d;
    for (int m = 1; m <= 1000000; m++) {
        double m2 = 2.0 * m;
        double num = m * (b - m) * x / ((a + m2 - 1.0) * (a + m2));
        for (int half = 0; half < 2; half++) {
            d = 1.0 + num * d;
            c = 1.0 + num / c;
            if (fabs(d) < tiny)
                d = tiny;
            if (fabs(c) < tiny)
                c = tiny;
            d = 1.0 / d;
            h *= d * c;
            num = -(a + m) * (a + b + m) * x / ((a + m2) * (a + m2 + 1.0));
        }
        if (fabs(d * c - 1.0) < eps)
            break;
    }
    return h;
}

/* The regularised incomplete beta function I_x(a, b). */
static double incomplete_beta(double a, double b, double x)
{
    if (x <= 0.0)
        return 0.0;
    if (x >= 1.0)
        return 1.0;
    double front = exp(lgamma(a + b) - lgamma(a) - lgamma(b) + a * log(x) + b * log1p(-x));
    if (x < (a + 1.0) / (a + b + 2.0))
        return front * beta_fraction(a, b, x) / a;
    return 1.0 - front * beta_fraction(b, a, 1.0 - x) / b;
}

/* P(T > t) for t >= 0, T Student's t with df degrees of freedom. */
static double t_upper_tail(double t, double df)
{
    return 0.5 * incomplete_beta(df / 2.0, 0.5, df / (df + t * t));
}

/* The standard normal quantile at 0.975 (to double precision). */
#define Z_975 1.959963984540054

double bc_t_quantile(double p, double df)
{
    if (!(p >= 0.5 && p < 1.0) || !(df >= 1.0))
        return NAN;
    if (p == 0.5)
        return 0.0;
    if (df > 1e5 && p == 0.975) { /* the expansion in 1/df (Abramowitz and Stegun 26.7.5); error O(df^-3) */
        const double z = Z_975, z2 = z * z;
        return z + z * (z2 + 1.0) / (4.0 * df) + z * ((5.0 * z2 + 16.0) * z2 + 3.0) / (96.0 * df * df);
    }
    double tail = 1.0 - p, lo = 0.0, hi = 1.0;
    while (t_upper_tail(hi, df) > tail && hi < 1e300)
        hi *= 2.0;
    for (int i = 0; i < 200 && hi - lo > 1e-15 * hi; i++) {
        double mid = 0.5 * (lo + hi);
        if (t_upper_tail(mid, df) > tail)
            lo = mid;
        else
            hi = mid;
    }
    return 0.5 * (lo + hi);
}

void bc__welford_stats(const bc__welford *w, bc_sample_stats *out)
{
    out->n = w->n;
    /* Identical values leave the running mean exactly at their value; otherwise
     * the sum over n is the more accurate mean. */
    out->mean = w->n == 0 ? NAN : w->m2 == 0.0 ? w->mean : w->sum / (double)w->n;
    out->sd = out->ci_low = out->ci_high = NAN;
    if (w->n < 2)
        return;
    out->sd = sqrt(w->m2 / (double)(w->n - 1));
    /* Identical returns give m2 = 0 exactly, hence an interval of width 0. */
    double half = bc_t_quantile(0.975, (double)(w->n - 1)) * out->sd / sqrt((double)w->n);
    out->ci_low = out->mean - half;
    out->ci_high = out->mean + half;
}

int64_t bc__percentile(const uint32_t *sorted, int64_t n, double q)
{
    if (n <= 0)
        return 0;
    int64_t rank = (int64_t)ceil(q / 100.0 * (double)n); /* nearest rank, 1-based */
    if (rank < 1)
        rank = 1;
    if (rank > n)
        rank = n;
    return sorted[rank - 1];
}
