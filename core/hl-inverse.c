/* hl-inverse.c: inverse questions by bracketing and root finding.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-inverse.h"

/* The scan grid is kept on the stack. */
#define HL_INVERSE_SCAN_STEPS_MAX 1000
/* A joint-load target beyond this many body weights is a typing error:
 * in vivo single-leg stance is 2.1-2.8 BW (Kotzar et al. 1991, J Orthop
 * Res 9:621-633). */
#define HL_INVERSE_TARGET_MAX_BW 20.0

typedef enum {
  SEEK_ROOT,         /* goal(x) = 0 */
  SEEK_FIRST_MET,    /* smallest x with goal(x) <= 0 */
  SEEK_KEEPS_MET,    /* largest x such that goal <= 0 all the way from lower */
} Seek;

typedef struct {
  HlModel m;           /* working copy, perturbed in place */
  HlRecon recon;
  bool has_recon;
  HlInverseKind kind;
  HlLoadSite site;
  double goal;
  bool need_mode;      /* evaluate the signed abductor need instead */
} Goal;

static const char *const kind_field[HL_INVERSE_N] = {
  "inverse offset-for-arm",
  "inverse offset-for-global-offset",
  "inverse cane-for-joint-load",
  "inverse load-for-joint-load",
  "inverse lean-for-capacity",
};

static const char *const kind_unit[HL_INVERSE_N] = { "mm", "mm", "N", "kg", "mm" };

void
hl_inverse_settings_default (HlInverseKind kind, const HlModel *model,
                             HlInverseSettings *s)
{
  s->method = HL_ROOT_BRENT;
  s->epsabs = HL_ROOT_EPSABS_DEFAULT;
  s->max_iter = HL_ROOT_MAX_ITER_DEFAULT;
  s->scan_steps = HL_INVERSE_SCAN_STEPS_DEFAULT;
  switch (kind)
    {
    case HL_INVERSE_CANE_FOR_JRF:
      s->lower = 0.0;
      s->upper = model->body_weight_n;
      break;
    case HL_INVERSE_LOAD_FOR_JRF:
      s->lower = 0.0;
      s->upper = HL_HAND_LOAD_MAX_KG;
      break;
    case HL_INVERSE_LEAN_FOR_CAPACITY:
      s->lower = 0.0;
      s->upper = HL_LEAN_MAX_MM;
      break;
    case HL_INVERSE_OFFSET_FOR_ARM:
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
    default:
      s->lower = -HL_RECON_LINEAR_MAX_MM;
      s->upper = HL_RECON_LINEAR_MAX_MM;
      break;
    }
}

/* The abductor force the posture asks for, negative where the loads
 * alone would tip the pelvis the other way (abductors not needed). */
static double
signed_need (const HlResult *r)
{
  if (r->flags & HL_FLAG_ABDUCTORS_NOT_NEEDED)
    return -fabs (r->unbalanced_nmm) / r->abductor_arm_mm;
  return r->abductor_force_n;
}

static void
goal_apply (Goal *g, double x)
{
  switch (g->kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      g->recon.femoral_offset_mm = x;
      break;
    case HL_INVERSE_CANE_FOR_JRF:
      g->m.cane_n = x;
      break;
    case HL_INVERSE_LOAD_FOR_JRF:
      if (g->site == HL_LOAD_SITE_MIDLINE)
        g->m.load_midline_n = x * HL_GRAVITY;
      else
        g->m.load_n[g->site] = x * HL_GRAVITY;
      break;
    case HL_INVERSE_LEAN_FOR_CAPACITY:
      g->m.lean_mm = x;
      break;
    default:
      break;
    }
}

static double
goal_quantity (const Goal *g, const HlResult *r)
{
  switch (g->kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM: return r->abductor_arm_mm;
    case HL_INVERSE_OFFSET_FOR_GLOBAL: return r->global_offset_change_mm;
    case HL_INVERSE_LEAN_FOR_CAPACITY: return r->demand;
    case HL_INVERSE_CANE_FOR_JRF:
    case HL_INVERSE_LOAD_FOR_JRF:
    default: return r->jrf_bw;
    }
}

static HlStatus
goal_function (double x, void *data, double *f, HlError *err)
{
  Goal *g = data;
  HlResult r;

  goal_apply (g, x);
  HlStatus st = hl_model_solve (&g->m, g->has_recon ? &g->recon : NULL, &r, err);
  if (st != HL_OK)
    return st;
  *f = g->need_mode ? signed_need (&r) : goal_quantity (g, &r) - g->goal;
  return HL_OK;
}

static HlStatus
check_settings (HlInverseKind kind, const HlInverseSettings *s, HlError *err)
{
  const char *field = kind_field[kind];
  if (!isfinite (s->lower) || !isfinite (s->upper) || !(s->lower < s->upper))
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The search range %g to %g %s is empty or not finite"),
                         s->lower, s->upper, kind_unit[kind]);
  if (s->scan_steps < 1 || s->scan_steps > HL_INVERSE_SCAN_STEPS_MAX)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The scan needs 1 to %d steps, not %d"),
                         HL_INVERSE_SCAN_STEPS_MAX, s->scan_steps);
  if (!(s->epsabs > 0.0) || !isfinite (s->epsabs))
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The tolerance must be a positive number, not %g"),
                         s->epsabs);
  if (s->max_iter < 1)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The iteration limit must be at least 1, not %d"),
                         s->max_iter);
  if (s->method != HL_ROOT_BISECTION && s->method != HL_ROOT_BRENT)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("Unknown root-finding method %d"), (int) s->method);
  return HL_OK;
}

static HlStatus
not_reachable (Goal *g, HlInverseAnswer *a, HlError *err)
{
  a->status = HL_ERR_NOT_REACHABLE;
  a->value = NAN;
  return hl_error_set (err, HL_ERR_NOT_REACHABLE, kind_field[g->kind],
                       _("Not reachable in range %g to %g %s"),
                       a->lower, a->upper, a->unit);
}

/* Solves the bracket [xa, xb] and puts the answer in a->value. */
static HlStatus
refine (Goal *g, Seek mode, const HlInverseSettings *s, double xa, double xb,
        HlInverseAnswer *a, HlError *err)
{
  HlRootSolver solver;
  HlStatus st = hl_root_find (&solver, s->method, goal_function, g, xa, xb,
                              s->epsabs, 0.0, s->max_iter, err);
  a->iterations = solver.iterations;
  if (st == HL_ERR_NOT_CONVERGED)
    {
      a->status = st;
      a->value = NAN;
      return st;
    }
  if (st != HL_OK)
    return st;

  if (mode == SEEK_ROOT)
    a->value = solver.root;
  else if (mode == SEEK_FIRST_MET)
    a->value = solver.f_lower <= 0.0 ? solver.x_lower : solver.x_upper;
  else
    a->value = solver.f_upper <= 0.0 ? solver.x_upper : solver.x_lower;
  return HL_OK;
}

static HlStatus
seek (Goal *g, Seek mode, const HlInverseSettings *s, double lower,
      double upper, HlInverseAnswer *a, HlError *err)
{
  const int n = s->scan_steps;
  double best = INFINITY, best_value = NAN;
  double x_prev = NAN, f_prev = NAN;
  bool have_prev = false;
  HlStatus first_failure = HL_OK;
  HlError scan_err = { 0 };

  a->lower = lower;
  a->upper = upper;
  a->status = HL_OK;
  a->value = NAN;

  for (int i = 0; i <= n; i++)
    {
      double x = i == n ? upper : lower + (upper - lower) * ((double) i / n);
      double f;
      HlStatus st = goal_function (x, g, &f, &scan_err);
      if (st != HL_OK)
        {
          /* Only a geometry question can leave the solvable region. */
          if (mode != SEEK_ROOT)
            {
              if (err != NULL)
                *err = scan_err;
              return st;
            }
          if (first_failure == HL_OK)
            {
              first_failure = st;
              if (err != NULL)
                *err = scan_err;
            }
          have_prev = false;
          continue;
        }

      double closeness = mode == SEEK_ROOT ? fabs (f) : f;
      if (closeness < best)
        {
          best = closeness;
          best_value = f + g->goal;
        }

      if (i == 0 && mode == SEEK_FIRST_MET && f <= 0.0)
        {
          a->at_limit = true;
          a->value = x;
          break;
        }
      if (i == 0 && mode == SEEK_KEEPS_MET && f > 0.0)
        {
          a->achieved = f + g->goal;
          return not_reachable (g, a, err);
        }
      if (mode == SEEK_ROOT && f == 0.0)
        {
          a->value = x;
          break;
        }

      if (have_prev)
        {
          bool crossing = false;
          switch (mode)
            {
            case SEEK_ROOT: crossing = (f_prev < 0.0) != (f < 0.0); break;
            case SEEK_FIRST_MET: crossing = f_prev > 0.0 && f <= 0.0; break;
            case SEEK_KEEPS_MET: crossing = f_prev <= 0.0 && f > 0.0; break;
            }
          if (crossing)
            {
              HlStatus rst = refine (g, mode, s, x_prev, x, a, err);
              if (rst != HL_OK)
                return rst;
              break;
            }
        }
      x_prev = x;
      f_prev = f;
      have_prev = true;

      if (i == n && mode == SEEK_KEEPS_MET)
        {
          a->at_limit = true;
          a->value = x;
        }
    }

  if (isnan (a->value))
    {
      if (!isfinite (best) && first_failure != HL_OK)
        return first_failure;   /* nowhere solvable: err says why */
      a->achieved = best_value;
      return not_reachable (g, a, err);
    }

  double f;
  HlStatus st = goal_function (a->value, g, &f, err);
  if (st != HL_OK)
    return st;
  a->achieved = f + g->goal;
  if (err != NULL)
    hl_error_clear (err);
  return HL_OK;
}

/* Cuts [lower, *upper] where the abductors stop being needed. */
static HlStatus
limit_to_need (Goal *g, const HlInverseSettings *s, double lower,
               double *upper, bool *limited, HlError *err)
{
  double need_lo, need_hi;
  HlStatus st;

  *limited = false;
  g->need_mode = true;
  if ((st = goal_function (lower, g, &need_lo, err))
      || (st = goal_function (*upper, g, &need_hi, err)))
    goto out;

  if (need_lo <= 0.0)
    {
      *upper = lower;
      *limited = true;
    }
  else if (need_hi < 0.0)
    {
      HlRootSolver solver;
      st = hl_root_find (&solver, s->method, goal_function, g, lower, *upper,
                         s->epsabs, 0.0, s->max_iter, err);
      if (st != HL_OK)
        goto out;
      *upper = solver.f_lower >= 0.0 ? solver.x_lower : solver.x_upper;
      *limited = true;
    }

out:
  g->need_mode = false;
  return st;
}

static HlStatus
begin (Goal *g, HlInverseKind kind, const HlModel *model, const HlRecon *option,
       const HlInverseSettings *settings, HlInverseSettings *s,
       HlInverseAnswer *a, HlError *err)
{
  memset (a, 0, sizeof *a);
  a->kind = kind;
  a->status = HL_ERR_INVALID;
  a->value = NAN;
  a->achieved = NAN;
  a->goal = NAN;
  a->unit = kind_unit[kind];
  a->body_weight_n = model->body_weight_n;

  if (settings != NULL)
    *s = *settings;
  else
    hl_inverse_settings_default (kind, model, s);
  a->lower = s->lower;
  a->upper = s->upper;

  HlStatus st = check_settings (kind, s, err);
  if (st != HL_OK)
    return st;

  memset (g, 0, sizeof *g);
  g->m = *model;
  g->kind = kind;
  g->has_recon = option != NULL;
  if (option != NULL)
    {
      /* A templated option is varied from the numbers its implants make. */
      if ((st = hl_recon_resolve (model, option, &g->recon, err)) != HL_OK)
        return st;
      g->recon.tmpl.on = false;
    }
  else
    hl_recon_init (&g->recon);
  return HL_OK;
}

static HlStatus
finish (HlInverseAnswer *a, HlStatus st)
{
  a->status = st;
  return st;
}

HlStatus
hl_inverse_offset_for_arm (const HlModel *model, const HlRecon *option,
                           const HlInverseSettings *settings,
                           HlInverseAnswer *a, HlError *err)
{
  Goal g;
  HlInverseSettings s;
  HlStatus st = begin (&g, HL_INVERSE_OFFSET_FOR_ARM, model, option, settings,
                       &s, a, err);
  if (st != HL_OK)
    return finish (a, st);
  if (option == NULL)
    return finish (a, hl_error_set (err, HL_ERR_INVALID, kind_field[a->kind],
                                    _("The femoral offset question needs a "
                                      "reconstruction option")));

  HlResult native;
  if ((st = hl_model_solve (model, NULL, &native, err)))
    return finish (a, st);
  g.goal = a->goal = native.abductor_arm_mm;
  return finish (a, seek (&g, SEEK_ROOT, &s, s.lower, s.upper, a, err));
}

HlStatus
hl_inverse_offset_for_global (const HlModel *model, const HlRecon *option,
                              const HlInverseSettings *settings,
                              HlInverseAnswer *a, HlError *err)
{
  Goal g;
  HlInverseSettings s;
  HlStatus st = begin (&g, HL_INVERSE_OFFSET_FOR_GLOBAL, model, option, settings,
                       &s, a, err);
  if (st != HL_OK)
    return finish (a, st);
  if (option == NULL)
    return finish (a, hl_error_set (err, HL_ERR_INVALID, kind_field[a->kind],
                                    _("The global offset question needs a "
                                      "reconstruction option")));

  g.goal = 0.0;
  if (isfinite (model->other_global_offset_mm) && isfinite (model->native_global_offset_mm))
    {
      g.goal = model->other_global_offset_mm - model->native_global_offset_mm;
      a->against_other_hip = true;
    }
  a->goal = g.goal;
  return finish (a, seek (&g, SEEK_ROOT, &s, s.lower, s.upper, a, err));
}

static HlStatus
check_target (HlInverseKind kind, double target_bw, HlError *err)
{
  if (!isfinite (target_bw) || target_bw <= 0.0 || target_bw > HL_INVERSE_TARGET_MAX_BW)
    return hl_error_set (err, HL_ERR_INVALID, kind_field[kind],
                         _("The joint load target is %g x body weight: it must be "
                           "above 0 and at most %g"), target_bw,
                         HL_INVERSE_TARGET_MAX_BW);
  return HL_OK;
}

/* The search range has collapsed to its lower end (beyond it the abductors
 * are no longer needed): the answer is that end where it meets the goal. */
static HlStatus
answer_at_lower (Goal *g, double lower, HlInverseAnswer *a, HlError *err)
{
  double f;
  HlStatus st;

  a->lower = a->upper = lower;
  if ((st = goal_function (lower, g, &f, err)))
    return st;
  a->achieved = f + g->goal;
  if (f > 0.0)
    return not_reachable (g, a, err);
  a->value = lower;
  a->at_limit = true;
  return HL_OK;
}

HlStatus
hl_inverse_cane_for_jrf (const HlModel *model, const HlRecon *option,
                         double target_bw, double distance_mm,
                         const HlInverseSettings *settings,
                         HlInverseAnswer *a, HlError *err)
{
  Goal g;
  HlInverseSettings s;
  HlStatus st = begin (&g, HL_INVERSE_CANE_FOR_JRF, model, option, settings,
                       &s, a, err);
  if (st != HL_OK || (st = check_target (a->kind, target_bw, err)))
    return finish (a, st);
  if (s.lower < 0.0)
    return finish (a, hl_error_set (err, HL_ERR_INVALID, kind_field[a->kind],
                                    _("A cane can only push up: the search range "
                                      "starts at %g N"), s.lower));

  if (!isfinite (distance_mm) || distance_mm < 0.0 || distance_mm > HL_DISTANCE_MAX_MM)
    return finish (a, hl_error_set (err, HL_ERR_INVALID, "cane distance",
                                    _("The cane hand's distance from the midline is "
                                      "%g mm: it must be between 0 and %g mm"),
                                    distance_mm, HL_DISTANCE_MAX_MM));

  g.m.cane_dx = -distance_mm;
  g.goal = a->goal = target_bw;
  double upper = s.upper;
  if ((st = limit_to_need (&g, &s, s.lower, &upper, &a->range_limited, err)))
    return finish (a, st);
  if (upper <= s.lower)   /* the abductors are not needed even without a cane */
    return finish (a, answer_at_lower (&g, s.lower, a, err));
  return finish (a, seek (&g, SEEK_FIRST_MET, &s, s.lower, upper, a, err));
}

HlStatus
hl_inverse_load_for_jrf (const HlModel *model, const HlRecon *option,
                         HlLoadSite site, double target_bw,
                         const HlInverseSettings *settings,
                         HlInverseAnswer *a, HlError *err)
{
  Goal g;
  HlInverseSettings s;
  HlStatus st = begin (&g, HL_INVERSE_LOAD_FOR_JRF, model, option, settings,
                       &s, a, err);
  a->site = site;
  if (st != HL_OK || (st = check_target (a->kind, target_bw, err)))
    return finish (a, st);
  if ((int) site < 0 || site >= HL_LOAD_SITE_N)
    return finish (a, hl_error_set (err, HL_ERR_INVALID, kind_field[a->kind],
                                    _("Unknown load site %d"), (int) site));
  if (s.lower < 0.0)
    return finish (a, hl_error_set (err, HL_ERR_INVALID, kind_field[a->kind],
                                    _("A carried load cannot be negative: the search "
                                      "range starts at %g kg"), s.lower));

  g.site = site;
  g.goal = a->goal = target_bw;
  double upper = s.upper;
  if ((st = limit_to_need (&g, &s, s.lower, &upper, &a->range_limited, err)))
    return finish (a, st);
  if (upper <= s.lower)
    return finish (a, answer_at_lower (&g, s.lower, a, err));
  return finish (a, seek (&g, SEEK_KEEPS_MET, &s, s.lower, upper, a, err));
}

HlStatus
hl_inverse_lean_for_capacity (const HlModel *model, const HlRecon *option,
                              const HlInverseSettings *settings,
                              HlInverseAnswer *a, HlError *err)
{
  Goal g;
  HlInverseSettings s;
  HlStatus st = begin (&g, HL_INVERSE_LEAN_FOR_CAPACITY, model, option, settings,
                       &s, a, err);
  if (st != HL_OK)
    return finish (a, st);
  if (!(model->capacity_force_n > 0.0) || !isfinite (model->capacity_force_n))
    return finish (a, hl_error_set (err, HL_ERR_INVALID, "capacity torque",
                                    _("The abductor capacity is not known, so demand "
                                      "over capacity cannot be found")));

  g.goal = a->goal = HL_DEMAND_LIMIT;
  return finish (a, seek (&g, SEEK_FIRST_MET, &s, s.lower, s.upper, a, err));
}

static const char *
site_words (HlLoadSite site)
{
  switch (site)
    {
    case HL_LOAD_SITE_CONTRALATERAL: return _("in the hand opposite the operated hip");
    case HL_LOAD_SITE_IPSILATERAL: return _("in the hand on the operated side");
    case HL_LOAD_SITE_MIDLINE: return _("on the midline");
    default: return "";
    }
}

const char *
hl_inverse_caveat (void)
{
  return _("The answers about loads, the cane and a lean are planning estimates "
           "of a static model, for the surgeon: they are not advice to the "
           "patient on what to carry, how to use a cane or how to walk.");
}

char *
hl_inverse_answer_format (const HlInverseAnswer *a, char *buf, size_t size)
{
  if (size == 0)
    return buf;
  buf[0] = '\0';
  if ((int) a->kind < 0 || a->kind >= HL_INVERSE_N)
    return buf;

  const char *u = a->unit;
  double bw = a->body_weight_n > 0.0 ? a->body_weight_n : NAN;

  if (a->status == HL_ERR_NOT_CONVERGED)
    {
      snprintf (buf, size, _("No answer: the search did not converge within its "
                             "iteration limit (%g to %g %s)."), a->lower, a->upper, u);
      return buf;
    }
  if (a->status != HL_OK && a->status != HL_ERR_NOT_REACHABLE)
    {
      snprintf (buf, size, _("No answer: %s."), hl_status_name (a->status));
      return buf;
    }

  bool ok = a->status == HL_OK;
  switch (a->kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
      if (ok)
        snprintf (buf, size, _("A femoral offset change of %+.1f mm restores the native "
                               "abductor moment arm (%.1f mm)."), a->value, a->goal);
      else
        snprintf (buf, size, _("Not reachable in range: no femoral offset change from "
                               "%+.0f to %+.0f mm restores the native abductor moment "
                               "arm (%.1f mm)."), a->lower, a->upper, a->goal);
      break;
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      {
        const char *ref = a->against_other_hip
                          ? _("the other hip's global offset")
                          : _("the native global offset");
        if (ok)
          snprintf (buf, size, _("A femoral offset change of %+.1f mm restores %s."),
                    a->value, ref);
        else
          snprintf (buf, size, _("Not reachable in range: no femoral offset change from "
                                 "%+.0f to %+.0f mm restores %s."), a->lower,
                    a->upper, ref);
      }
      break;
    case HL_INVERSE_CANE_FOR_JRF:
      if (ok && a->at_limit)
        snprintf (buf, size, _("In this static model the estimated joint load is "
                               "already at or below %.2f x body weight without a "
                               "cane."), a->goal);
      else if (ok)
        snprintf (buf, size, _("In this static model, a cane force of %.0f N (%.1f%% "
                               "of body weight) in the opposite hand would bring the "
                               "estimated joint load down to %.2f x body weight."), a->value, 100.0 * a->value / bw, a->goal);
      else
        snprintf (buf, size, _("Not reachable in range: in this static model no cane "
                               "force from %.0f to %.0f N brings the estimated joint "
                               "load down to %.2f x body weight (the lowest is "
                               "%.2f)%s."), a->lower, a->upper,
                  a->goal, a->achieved,
                  a->range_limited ? _("; beyond that the abductors are no longer "
                                       "needed and this model does not apply") : "");
      break;
    case HL_INVERSE_LOAD_FOR_JRF:
      if (ok && a->at_limit)
        snprintf (buf, size, _("In this static model, any load up to %.1f kg %s would "
                               "keep the estimated joint load at or below %.2f x body "
                               "weight%s."), a->value,
                  site_words (a->site), a->goal,
                  a->range_limited ? _(" (beyond it the abductors are no longer "
                                       "needed and this model does not apply)") : "");
      else if (ok)
        snprintf (buf, size, _("In this static model, a load of up to %.1f kg %s "
                               "would keep the estimated joint load at or below %.2f x "
                               "body weight."), a->value,
                  site_words (a->site), a->goal);
      else
        snprintf (buf, size, _("Not reachable: in this static model, even with no "
                               "load %s the estimated joint load is above %.2f x body "
                               "weight."), site_words (a->site),
                  a->goal);
      break;
    case HL_INVERSE_LEAN_FOR_CAPACITY:
      if (ok && a->at_limit)
        snprintf (buf, size, _("In this static model the estimated abductor demand is "
                               "within capacity without a lean."));
      else if (ok)
        snprintf (buf, size, _("In this static model, a lateral trunk lean of %.1f mm "
                               "towards the operated side would bring the estimated "
                               "abductor demand within capacity."), a->value);
      else
        snprintf (buf, size, _("Not reachable in range: no lean from %.0f to %.0f mm "
                               "brings abductor demand within capacity."), a->lower,
                  a->upper);
      break;
    default:
      break;
    }
  return buf;
}
