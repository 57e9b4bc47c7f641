#include "observe.h"

#include <math.h>

double gw_head_at(const gw_grid *g, const double *head, double x, double y)
{
    double u = gw_grid_u(g, x) - 0.5, v = gw_grid_v(g, y) - 0.5;
    if (!(u >= -0.5 && u <= g->nx - 0.5 && v >= -0.5 && v <= g->ny - 0.5))
        return NAN;
    int c0 = (int)floor(u), r0 = (int)floor(v);
    double fu = u - c0, fv = v - r0;
    double sum = 0.0, wsum = 0.0;
    for (int dr = 0; dr < 2; dr++) {
        for (int dc = 0; dc < 2; dc++) {
            int c = c0 + dc, r = r0 + dr;
            double w = (dc ? fu : 1.0 - fu) * (dr ? fv : 1.0 - fv);
            if (w <= 0.0 || c < 0 || r < 0 || c >= g->nx || r >= g->ny)
                continue;
            double hv = head[(size_t)r * g->nx + c];
            if (!isfinite(hv))
                continue;
            sum += w * hv;
            wsum += w;
        }
    }
    return wsum > 0.0 ? sum / wsum : NAN;
}

void gw_residual_stats_compute(const double *observed, const double *simulated, int n,
                               gw_residual_stats *st)
{
    st->n = 0;
    st->mean_error = st->mean_abs_error = st->rms_error = 0.0;
    for (int i = 0; i < n; i++) {
        if (!isfinite(observed[i]) || !isfinite(simulated[i]))
            continue;
        double r = observed[i] - simulated[i];
        st->n++;
        st->mean_error += r;
        st->mean_abs_error += fabs(r);
        st->rms_error += r * r;
    }
    if (st->n > 0) {
        st->mean_error /= st->n;
        st->mean_abs_error /= st->n;
        st->rms_error = sqrt(st->rms_error / st->n);
    }
}
