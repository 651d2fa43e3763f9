/* hl-uncertainty.c: Monte Carlo on a prepared model; percentiles by
 * selection.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-measure.h"
#include "hl-uncertainty.h"

#define DEG (M_PI / 180.0)
#define MC_FIELD "uncertainty"
/* Floyd and Rivest's sampling step pays above this many elements (their
 * published constant). */
#define HL_SELECT_SAMPLE_ABOVE 600
/* Rows kept per sample: abductor force and joint load. */
#define MC_QUANTITIES 2

struct HlMcWorkspace {
  size_t max_samples;
  size_t max_options;
  double *values;        /* [(row * MC_QUANTITIES + q) * max_samples + sample] */
  size_t *lower_count;   /* per row: samples with a joint load below native */
  HlNormalTable normal;
};

HlMcWorkspace *
hl_mc_workspace_new (size_t max_samples, size_t max_options)
{
  if (max_samples == 0 || max_samples > HL_MC_SAMPLES_MAX
      || max_options > SIZE_MAX / MC_QUANTITIES / HL_MC_SAMPLES_MAX - 1)
    return NULL;

  HlMcWorkspace *ws = calloc (1, sizeof *ws);
  if (ws == NULL)
    return NULL;
  size_t rows = 1 + max_options;
  ws->max_samples = max_samples;
  ws->max_options = max_options;
  ws->values = malloc (rows * MC_QUANTITIES * max_samples * sizeof *ws->values);
  ws->lower_count = calloc (rows, sizeof *ws->lower_count);
  hl_normal_table_init (&ws->normal);
  if (ws->values == NULL || ws->lower_count == NULL)
    {
      hl_mc_workspace_free (ws);
      return NULL;
    }
  return ws;
}

void
hl_mc_workspace_free (HlMcWorkspace *ws)
{
  if (ws == NULL)
    return;
  free (ws->values);
  free (ws->lower_count);
  free (ws);
}

void
hl_mc_settings_for_plan (const HlPlan *plan, HlMcSettings *s, bool *m_assumed)
{
  bool assumed = false;

  *s = plan->uncertainty;
  if (hl_calibration_magnification (&plan->calibration, &s->magnification,
                                    &assumed, NULL) != HL_OK
      || !(s->magnification >= HL_MAGNIFICATION_MIN
           && s->magnification <= HL_MAGNIFICATION_MAX))
    {
      s->magnification = HL_MAGNIFICATION_ASSUMED;
      assumed = true;
    }
  if (m_assumed != NULL)
    *m_assumed = assumed;
}

/* ---- Selection -------------------------------------------------------- */

static inline void
swap (double *a, ptrdiff_t i, ptrdiff_t j)
{
  double t = a[i];
  a[i] = a[j];
  a[j] = t;
}

/* Rearranges a[lo .. hi] (inclusive) so that a[k] holds the value it would
 * hold sorted, with nothing larger before it and nothing smaller after:
 * Floyd & Rivest 1975, "Algorithm 489: the algorithm SELECT", CACM
 * 18:173.  On a large range it first selects within a small sample
 * around the expected position, so that one partition of the whole range
 * lands next to k (about n + min(k, n - k) comparisons, against about 3n
 * for a median-of-three pivot when k is near a tail). */
static void
select_kth (double *a, ptrdiff_t lo, ptrdiff_t hi, ptrdiff_t k)
{
  while (hi > lo)
    {
      if (hi - lo > HL_SELECT_SAMPLE_ABOVE)
        {
          const double n = (double) (hi - lo + 1);
          const double i = (double) (k - lo + 1);
          const double z = log (n);
          const double sample = 0.5 * exp (2.0 * z / 3.0);
          const double sd = 0.5 * sqrt (z * sample * (n - sample) / n)
                            * (i - n / 2.0 < 0.0 ? -1.0 : 1.0);
          ptrdiff_t new_lo = (ptrdiff_t) fmax ((double) lo,
                                               floor ((double) k - i * sample / n + sd));
          ptrdiff_t new_hi = (ptrdiff_t) fmin ((double) hi,
                                               floor ((double) k + (n - i) * sample / n + sd));
          select_kth (a, new_lo, new_hi, k);
        }

      const double t = a[k];
      ptrdiff_t i = lo, j = hi;
      swap (a, lo, k);
      if (a[hi] > t)
        swap (a, hi, lo);
      while (i < j)
        {
          swap (a, i, j);
          i++;
          j--;
          while (a[i] < t)
            i++;
          while (a[j] > t)
            j--;
        }
      if (a[lo] == t)
        swap (a, lo, j);
      else
        {
          j++;
          swap (a, j, hi);
        }
      if (j <= k)
        lo = j + 1;
      if (k <= j)
        hi = j - 1;
    }
}

static ptrdiff_t
rank_of (double p, size_t n)
{
  double h = (double) (n - 1) * fmin (fmax (p, 0.0), 1.0);
  ptrdiff_t k = (ptrdiff_t) floor (h);
  return k > (ptrdiff_t) n - 1 ? (ptrdiff_t) n - 1 : k;
}

/* Places the order statistics of probs[0 .. m-1] (ascending) within
 * a[lo .. hi], the middle one first so that each side is searched only in
 * its own part. */
static void
multiselect (double *a, size_t n, ptrdiff_t lo, ptrdiff_t hi,
             const double *probs, size_t m)
{
  if (m == 0 || lo > hi)
    return;
  size_t mid = m / 2;
  ptrdiff_t k = rank_of (probs[mid], n);
  if (k >= lo && k <= hi)
    select_kth (a, lo, hi, k);
  multiselect (a, n, lo, k - 1 < hi ? k - 1 : hi, probs, mid);
  multiselect (a, n, k + 1 > lo ? k + 1 : lo, hi, probs + mid + 1, m - mid - 1);
}

void
hl_quantiles_select (double *a, size_t n, const double *probs, size_t n_probs,
                     double *out)
{
  if (n == 0)
    {
      for (size_t i = 0; i < n_probs; i++)
        out[i] = NAN;
      return;
    }

  bool ascending = true;
  for (size_t i = 1; i < n_probs; i++)
    ascending = ascending && probs[i - 1] <= probs[i];

  const ptrdiff_t last = (ptrdiff_t) n - 1;
  if (ascending)
    multiselect (a, n, 0, last, probs, n_probs);

  for (size_t i = 0; i < n_probs; i++)
    {
      ptrdiff_t k = rank_of (probs[i], n);
      double frac = (double) last * fmin (fmax (probs[i], 0.0), 1.0) - (double) k;
      if (!ascending)
        select_kth (a, 0, last, k);

      /* The next order statistic is the least value above k, up to the
       * next placed one (which bounds everything before it). */
      ptrdiff_t bound = last;
      for (size_t j = i + 1; ascending && j < n_probs; j++)
        {
          ptrdiff_t kj = rank_of (probs[j], n);
          if (kj > k)
            {
              bound = kj;
              break;
            }
        }
      double next = a[k];
      if (frac > 0.0 && k < last)
        {
          next = a[k + 1];
          for (ptrdiff_t j = k + 2; j <= bound; j++)
            if (a[j] < next)
              next = a[j];
        }
      out[i] = a[k] + frac * (next - a[k]);
    }
}

/* ---- Monte Carlo ------------------------------------------------------ */

static HlStatus
check_sd (double v, double max, const char *what, const char *unit, HlError *err)
{
  if (!isfinite (v) || v < 0.0 || v > max)
    return hl_error_set (err, HL_ERR_INVALID, MC_FIELD,
                         _("The %s is %g %s: it must be between 0 and %g %s"),
                         what, v, unit, max, unit);
  return HL_OK;
}

static HlStatus
check_run (const HlMcWorkspace *ws, const HlOption *options, size_t n_options,
           const HlMcSettings *s, const HlMcSummary *summary, HlError *err)
{
  HlStatus st;

  if (ws == NULL || s == NULL || summary == NULL)
    return hl_error_set (err, HL_ERR_INVALID, MC_FIELD,
                         _("The uncertainty run lacks its workspace, settings or "
                           "summary"));
  if (s->n_samples < 1 || s->n_samples > ws->max_samples)
    return hl_error_set (err, HL_ERR_INVALID, MC_FIELD,
                         _("%zu samples asked for; the workspace holds 1 to %zu"),
                         s->n_samples, ws->max_samples);
  if (n_options > ws->max_options || (n_options > 0 && options == NULL))
    return hl_error_set (err, HL_ERR_INVALID, MC_FIELD,
                         _("%zu options asked for; the workspace holds %zu"),
                         n_options, ws->max_options);
  if ((st = check_sd (s->landmark_sd_mm, HL_MC_LANDMARK_SD_MM_MAX,
                      _("landmark placement error"), "mm", err))
      || (st = check_sd (s->magnification_sd, HL_MC_MAGNIFICATION_SD_MAX,
                         _("magnification error"), "", err))
      || (st = check_sd (s->line_angle_sd_deg, HL_MC_LINE_ANGLE_SD_DEG_MAX,
                         _("abductor line angle error"), "deg", err)))
    return st;
  if (!isfinite (s->magnification) || s->magnification < HL_MAGNIFICATION_MIN
      || s->magnification > HL_MAGNIFICATION_MAX)
    return hl_error_set (err, HL_ERR_INVALID, MC_FIELD,
                         _("The magnification is %g: it must be between %g and %g"),
                         s->magnification, HL_MAGNIFICATION_MIN,
                         HL_MAGNIFICATION_MAX);
  return HL_OK;
}

/* One sample's geometry into m (other fields as in the base).  False when
 * the sampled magnification is not positive. */
static inline bool
perturb (HlModel *m, const HlModel *base, HlRng *rng, const HlNormalTable *nt,
         double lsd, double asd, double msd, double mag)
{
  HlVec2 o = base->origin, ins = base->insertion, mid = base->midline;
  HlVec2 u = base->u_fixed;

  if (lsd > 0.0)
    {
      const double hx = lsd * hl_rng_normal_zig (rng, nt);
      const double hy = lsd * hl_rng_normal_zig (rng, nt);
      const double ix = lsd * hl_rng_normal_zig (rng, nt);
      const double iy = lsd * hl_rng_normal_zig (rng, nt);
      mid.x += lsd * hl_rng_normal_zig (rng, nt) - hx;
      mid.y += lsd * hl_rng_normal_zig (rng, nt) - hy;
      ins.x += ix - hx;
      ins.y += iy - hy;
      if (base->angle_mode)
        {
          o.x += ix - hx;
          o.y += iy - hy;
        }
      else
        {
          o.x += lsd * hl_rng_normal_zig (rng, nt) - hx;
          o.y += lsd * hl_rng_normal_zig (rng, nt) - hy;
        }
    }

  if (asd > 0.0)
    {
      const double d = asd * hl_rng_normal_zig (rng, nt);
      const double c = cos (d), sn = sin (d);
      const double rx = o.x - ins.x, ry = o.y - ins.y;
      o.x = ins.x + c * rx - sn * ry;
      o.y = ins.y + sn * rx + c * ry;
      if (base->angle_mode)
        u = (HlVec2) { c * u.x - sn * u.y, sn * u.x + c * u.y };
    }

  if (msd > 0.0)
    {
      const double ms = mag + msd * hl_rng_normal_zig (rng, nt);
      if (!(ms > 0.0))
        return false;
      const double k = mag / ms;
      o.x *= k; o.y *= k;
      ins.x *= k; ins.y *= k;
      mid.x *= k; mid.y *= k;
    }

  m->origin = o;
  m->insertion = ins;
  m->midline = mid;
  m->u_fixed = u;
  return true;
}

HlStatus
hl_mc_run (HlMcWorkspace *ws, const HlModel *model, const HlOption *options,
           size_t n_options, const HlMcSettings *s, HlMcSummary *summary,
           HlMcInfo *info, HlError *err)
{
  HlStatus st = check_run (ws, options, n_options, s, summary, err);
  if (st != HL_OK)
    return st;

  const size_t rows = 1 + n_options;
  const size_t n = s->n_samples;
  const size_t stride = ws->max_samples;
  const double lsd = s->landmark_sd_mm;
  const double asd = s->line_angle_sd_deg * DEG;
  const double msd = s->magnification_sd;
  double *const values = ws->values;
  size_t *const lower = ws->lower_count;
  size_t used = 0, dropped = 0;
  HlRng rng;
  HlModel m = *model;

  hl_rng_seed (&rng, s->seed);
  memset (lower, 0, rows * sizeof *lower);

  for (size_t j = 0; j < n; j++)
    {
      bool ok = perturb (&m, model, &rng, &ws->normal, lsd, asd, msd,
                         s->magnification);
      for (size_t row = 0; ok && row < rows; row++)
        {
          HlResult r;
          const HlRecon *recon = row == 0 ? NULL : &options[row - 1].recon;
          if (hl_model_solve (&m, recon, &r, NULL) != HL_OK)
            {
              ok = false;
              break;
            }
          values[(row * MC_QUANTITIES + 0) * stride + used] = r.abductor_force_n;
          values[(row * MC_QUANTITIES + 1) * stride + used] = r.jrf_n;
        }
      if (!ok)
        {
          dropped++;
          continue;
        }
      const double native_jrf = values[1 * stride + used];
      for (size_t row = 1; row < rows; row++)
        lower[row] += values[(row * MC_QUANTITIES + 1) * stride + used] < native_jrf;
      used++;
    }

  if (info != NULL)
    {
      info->seed = s->seed;
      info->n_used = used;
      info->n_dropped = dropped;
    }
  if (used == 0)
    return hl_error_set (err, HL_ERR_DEGENERATE, MC_FIELD,
                         _("None of the %zu samples could be solved: the errors "
                           "are too large for this geometry"), n);

  static const double probs[3] = { HL_MC_P_LOW, HL_MC_P_MID, HL_MC_P_HIGH };
  const double inv_bw = model->inv_body_weight;
  for (size_t row = 0; row < rows; row++)
    {
      HlMcSummary *out = &summary[row];
      double q[3];

      hl_quantiles_select (&values[(row * MC_QUANTITIES + 0) * stride], used,
                           probs, 3, q);
      out->abductor_force_n = (HlPercentiles) { q[0], q[1], q[2] };
      out->abductor_force_bw = (HlPercentiles) { q[0] * inv_bw, q[1] * inv_bw,
                                                 q[2] * inv_bw };
      hl_quantiles_select (&values[(row * MC_QUANTITIES + 1) * stride], used,
                           probs, 3, q);
      out->jrf_n = (HlPercentiles) { q[0], q[1], q[2] };
      out->jrf_bw = (HlPercentiles) { q[0] * inv_bw, q[1] * inv_bw, q[2] * inv_bw };
      out->share_lower_jrf = row == 0 ? NAN : (double) lower[row] / (double) used;
    }
  return HL_OK;
}
