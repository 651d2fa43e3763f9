/* hl-uncertainty.c: Monte Carlo on a prepared model; random numbers,
 * selection and percentiles by GSL.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <glib.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_statistics_double.h>

#include "hl-deadline.h"
#include "hl-i18n.h"
#include "hl-measure.h"
#include "hl-uncertainty.h"

#define DEG (M_PI / 180.0)
#define MC_FIELD "uncertainty"
/* Rows kept per sample: abductor force and joint load. */
#define MC_QUANTITIES 2

struct HlMcWorkspace {
  size_t max_samples;
  size_t max_options;
  double *values;        /* [(row * MC_QUANTITIES + q) * max_samples + sample] */
  size_t *lower_count;   /* per row: samples with a joint load below native */
  gsl_rng *rng;           /* seeded at each run */
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
  /* GSL's default handler aborts when gsl_rng_alloc runs out of memory;
   * the NULL it returns is checked below. */
  static gsize handler_off = 0;
  if (g_once_init_enter (&handler_off))
    {
      gsl_set_error_handler_off ();
      g_once_init_leave (&handler_off, 1);
    }
  ws->rng = gsl_rng_alloc (HL_MC_GENERATOR);
  if (ws->values == NULL || ws->lower_count == NULL || ws->rng == NULL)
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
  if (ws->rng != NULL)
    gsl_rng_free (ws->rng);
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

void
hl_quantiles (double *a, size_t n, const double *probs, size_t n_probs,
              double *out)
{
  if (n == 0)
    {
      for (size_t i = 0; i < n_probs; i++)
        out[i] = NAN;
      return;
    }
  /* gsl_stats_quantile_from_sorted_data reads the two order statistics
   * around the quantile, x_(k) and x_(k+1) with k = floor ((n - 1) p).
   * Rather than sort all n values for three quantiles, gsl_stats_select
   * (a quickselect) puts x_(k) in place with nothing smaller after it, and
   * the least value after it is moved next to it: the array is then sorted
   * where the quantile is read. */
  for (size_t i = 0; i < n_probs; i++)
    {
      const double p = fmin (fmax (probs[i], 0.0), 1.0);
      const size_t k = (size_t) floor ((double) (n - 1) * p);
      gsl_stats_select (a, 1, n, k);
      if (k + 1 < n)
        {
          size_t least = k + 1;
          for (size_t j = k + 2; j < n; j++)
            if (a[j] < a[least])
              least = j;
          const double t = a[k + 1];
          a[k + 1] = a[least];
          a[least] = t;
        }
      out[i] = gsl_stats_quantile_from_sorted_data (a, 1, n, p);
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
perturb (HlModel *m, const HlModel *base, const gsl_rng *rng,
         double lsd, double asd, double msd, double mag)
{
  HlVec2 o = base->origin, ins = base->insertion, mid = base->midline;
  HlVec2 u = base->u_fixed;

  if (lsd > 0.0)
    {
      const double hx = gsl_ran_gaussian_ziggurat (rng, lsd);
      const double hy = gsl_ran_gaussian_ziggurat (rng, lsd);
      const double ix = gsl_ran_gaussian_ziggurat (rng, lsd);
      const double iy = gsl_ran_gaussian_ziggurat (rng, lsd);
      mid.x += gsl_ran_gaussian_ziggurat (rng, lsd) - hx;
      mid.y += gsl_ran_gaussian_ziggurat (rng, lsd) - hy;
      ins.x += ix - hx;
      ins.y += iy - hy;
      if (base->angle_mode)
        {
          o.x += ix - hx;
          o.y += iy - hy;
        }
      else
        {
          o.x += gsl_ran_gaussian_ziggurat (rng, lsd) - hx;
          o.y += gsl_ran_gaussian_ziggurat (rng, lsd) - hy;
        }
    }

  if (asd > 0.0)
    {
      const double d = gsl_ran_gaussian_ziggurat (rng, asd);
      const double c = cos (d), sn = sin (d);
      const double rx = o.x - ins.x, ry = o.y - ins.y;
      o.x = ins.x + c * rx - sn * ry;
      o.y = ins.y + sn * rx + c * ry;
      if (base->angle_mode)
        u = (HlVec2) { c * u.x - sn * u.y, sn * u.x + c * u.y };
    }

  if (msd > 0.0)
    {
      const double ms = mag + gsl_ran_gaussian_ziggurat (rng, msd);
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

unsigned long
hl_mc_generator_seed (uint64_t seed)
{
  /* MT19937 takes 32 bits of seed: both halves of the 64 count. */
  return (unsigned long) ((seed ^ (seed >> 32)) & 0xffffffffu);
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
  HlModel m = *model;

  gsl_rng_set (ws->rng, hl_mc_generator_seed (s->seed));
  memset (lower, 0, rows * sizeof *lower);

  for (size_t j = 0; j < n; j++)
    {
      /* within the calling thread's time budget (hl-deadline.h): every 64
       * samples, some thousands of solves at most */
      if ((j & 63) == 0 && hl_deadline_passed ())
        return hl_deadline_error (err, _("The uncertainty run"));
      bool ok = perturb (&m, model, ws->rng, lsd, asd, msd,
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

      hl_quantiles (&values[(row * MC_QUANTITIES + 0) * stride], used,
                           probs, 3, q);
      out->abductor_force_n = (HlPercentiles) { q[0], q[1], q[2] };
      out->abductor_force_bw = (HlPercentiles) { q[0] * inv_bw, q[1] * inv_bw,
                                                 q[2] * inv_bw };
      hl_quantiles (&values[(row * MC_QUANTITIES + 1) * stride], used,
                           probs, 3, q);
      out->jrf_n = (HlPercentiles) { q[0], q[1], q[2] };
      out->jrf_bw = (HlPercentiles) { q[0] * inv_bw, q[1] * inv_bw, q[2] * inv_bw };
      out->share_lower_jrf = row == 0 ? NAN : (double) lower[row] / (double) used;
    }
  return HL_OK;
}
