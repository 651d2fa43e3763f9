/* hl-sweep.c: parameter sweeps on a prepared model.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hl-deadline.h"
#include "hl-i18n.h"
#include "hl-sweep.h"

#define DEG (M_PI / 180.0)

/* The abductor line angles hl_plan_check accepts. */
#define HL_ABDUCTOR_ANGLE_MIN_DEG 30.0
#define HL_ABDUCTOR_ANGLE_MAX_DEG 89.0
/* Chart ranges: a planning window of our own choosing (assumptions, easy
 * to override on the command line). */
#define HL_SWEEP_RECON_SPAN_MM 15.0
#define HL_SWEEP_HEAD_SPAN_MM 8.0
#define HL_SWEEP_NECK_FROM_DEG 120.0
#define HL_SWEEP_NECK_TO_DEG 145.0
/* Patients rarely put more than 20% BW through a cane (Brand &
 * Crowninshield 1980, Clin Orthop 147:181-184); the charts go a little
 * beyond it. */
#define HL_SWEEP_CANE_TO_PERCENT 25.0
#define HL_SWEEP_CANE_TO_N 200.0
#define HL_SWEEP_LOAD_TO_KG 25.0
#define HL_SWEEP_LEAN_TO_MM 50.0
#define HL_SWEEP_MASS_FROM_KG 40.0
#define HL_SWEEP_MASS_TO_KG 150.0
#define HL_SWEEP_ANGLE_FROM_DEG 55.0
#define HL_SWEEP_ANGLE_TO_DEG 80.0

static const HlSweepParamInfo params[HL_SWEEP_N] = {
  { HL_SWEEP_CUP_MEDIAL, "cup_medial_mm", N_("Cup medialisation"), "mm", true,
    -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM,
    -HL_SWEEP_RECON_SPAN_MM, HL_SWEEP_RECON_SPAN_MM },
  { HL_SWEEP_CUP_SUPERIOR, "cup_superior_mm", N_("Cup height"), "mm", true,
    -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM,
    -HL_SWEEP_RECON_SPAN_MM, HL_SWEEP_RECON_SPAN_MM },
  { HL_SWEEP_FEMORAL_OFFSET, "femoral_offset_mm", N_("Femoral offset change"), "mm",
    true, -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM,
    -HL_SWEEP_RECON_SPAN_MM, HL_SWEEP_RECON_SPAN_MM },
  { HL_SWEEP_FEMORAL_LENGTH, "femoral_length_mm", N_("Femoral length change"), "mm",
    true, -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM,
    -HL_SWEEP_RECON_SPAN_MM, HL_SWEEP_RECON_SPAN_MM },
  { HL_SWEEP_HEAD_LENGTH, "head_length_mm", N_("Head length change"), "mm", true,
    -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM,
    -HL_SWEEP_HEAD_SPAN_MM, HL_SWEEP_HEAD_SPAN_MM },
  { HL_SWEEP_NECK_SHAFT_ANGLE, "neck_shaft_angle_deg", N_("Neck-shaft angle"), "deg",
    true, HL_NECK_SHAFT_MIN_DEG, HL_NECK_SHAFT_MAX_DEG,
    HL_SWEEP_NECK_FROM_DEG, HL_SWEEP_NECK_TO_DEG },
  { HL_SWEEP_CANE_FORCE_N, "cane_force_n", N_("Cane force"), "N", false,
    0.0, INFINITY, 0.0, HL_SWEEP_CANE_TO_N },
  { HL_SWEEP_CANE_PERCENT_BW, "cane_percent_bw", N_("Cane force"), "%BW", false,
    0.0, 100.0, 0.0, HL_SWEEP_CANE_TO_PERCENT },
  { HL_SWEEP_LOAD_CONTRA_KG, "load_contra_kg", N_("Load in the opposite hand"), "kg",
    false, 0.0, HL_HAND_LOAD_MAX_KG, 0.0, HL_SWEEP_LOAD_TO_KG },
  { HL_SWEEP_LOAD_IPSI_KG, "load_ipsi_kg", N_("Load in the same-side hand"), "kg",
    false, 0.0, HL_HAND_LOAD_MAX_KG, 0.0, HL_SWEEP_LOAD_TO_KG },
  { HL_SWEEP_LOAD_MIDLINE_KG, "load_midline_kg", N_("Load on the midline"), "kg",
    false, 0.0, HL_HAND_LOAD_MAX_KG, 0.0, HL_SWEEP_LOAD_TO_KG },
  { HL_SWEEP_LEAN_MM, "lean_mm", N_("Lateral trunk lean"), "mm", false,
    HL_LEAN_MIN_MM, HL_LEAN_MAX_MM, 0.0, HL_SWEEP_LEAN_TO_MM },
  { HL_SWEEP_MASS_KG, "mass_kg", N_("Body mass"), "kg", false,
    HL_MASS_MIN_KG, HL_MASS_MAX_KG, HL_SWEEP_MASS_FROM_KG, HL_SWEEP_MASS_TO_KG },
  { HL_SWEEP_ABDUCTOR_ANGLE_DEG, "abductor_angle_deg", N_("Abductor line angle"),
    "deg", false, HL_ABDUCTOR_ANGLE_MIN_DEG, HL_ABDUCTOR_ANGLE_MAX_DEG,
    HL_SWEEP_ANGLE_FROM_DEG, HL_SWEEP_ANGLE_TO_DEG },
};

const HlSweepParamInfo *
hl_sweep_param_info (HlSweepParam param)
{
  if ((int) param < 0 || param >= HL_SWEEP_N)
    return NULL;
  return &params[param];
}

HlSweepParam
hl_sweep_param_from_key (const char *key)
{
  for (int i = 0; key != NULL && i < HL_SWEEP_N; i++)
    if (strcmp (params[i].key, key) == 0)
      return (HlSweepParam) i;
  return HL_SWEEP_N;
}

double
hl_sweep_value (const HlSweepSpec *spec, size_t step)
{
  if (spec->n_steps < 2 || step + 1 >= spec->n_steps)
    return step == 0 && spec->n_steps < 2 ? spec->from : spec->to;
  if (step == 0)
    return spec->from;
  return spec->from + (spec->to - spec->from) * ((double) step / (double) (spec->n_steps - 1));
}

static double
recon_get (const HlRecon *r, HlSweepParam param)
{
  switch (param)
    {
    case HL_SWEEP_CUP_MEDIAL: return r->cup_medial_mm;
    case HL_SWEEP_CUP_SUPERIOR: return r->cup_superior_mm;
    case HL_SWEEP_FEMORAL_OFFSET: return r->femoral_offset_mm;
    case HL_SWEEP_FEMORAL_LENGTH: return r->femoral_length_mm;
    case HL_SWEEP_HEAD_LENGTH: return r->head_length_mm;
    case HL_SWEEP_NECK_SHAFT_ANGLE: return r->neck_shaft_angle_deg;
    default: return 0.0;
    }
}

static void
recon_set (HlRecon *r, HlSweepParam param, double v)
{
  switch (param)
    {
    case HL_SWEEP_CUP_MEDIAL: r->cup_medial_mm = v; break;
    case HL_SWEEP_CUP_SUPERIOR: r->cup_superior_mm = v; break;
    case HL_SWEEP_FEMORAL_OFFSET: r->femoral_offset_mm = v; break;
    case HL_SWEEP_FEMORAL_LENGTH: r->femoral_length_mm = v; break;
    case HL_SWEEP_HEAD_LENGTH: r->head_length_mm = v; break;
    case HL_SWEEP_NECK_SHAFT_ANGLE: r->neck_shaft_angle_deg = v; break;
    default: break;
    }
}

/* Sets a whole-model parameter on `m`, a copy of `base`.  Mass scales
 * everything that hl_model_prepare derives from it. */
static HlStatus
model_set (HlModel *m, const HlModel *base, const HlPlan *plan,
           HlSweepParam param, double v, HlError *err)
{
  switch (param)
    {
    case HL_SWEEP_CANE_FORCE_N:
    case HL_SWEEP_CANE_PERCENT_BW:
      /* The model drops the cane's position when the plan has no cane. */
      m->cane_dx = plan->cane.hand == HL_HAND_CONTRALATERAL
                   ? -plan->cane.distance_mm : plan->cane.distance_mm;
      m->cane_n = param == HL_SWEEP_CANE_FORCE_N ? v : v / 100.0 * m->body_weight_n;
      break;
    case HL_SWEEP_LOAD_CONTRA_KG:
      m->load_n[HL_HAND_CONTRALATERAL] = v * HL_GRAVITY;
      break;
    case HL_SWEEP_LOAD_IPSI_KG:
      m->load_n[HL_HAND_IPSILATERAL] = v * HL_GRAVITY;
      break;
    case HL_SWEEP_LOAD_MIDLINE_KG:
      m->load_midline_n = v * HL_GRAVITY;
      break;
    case HL_SWEEP_LEAN_MM:
      m->lean_mm = v;
      break;
    case HL_SWEEP_MASS_KG:
      {
        double k = v / plan->mass_kg;
        m->body_weight_n = v * HL_GRAVITY;
        m->inv_body_weight = 1.0 / m->body_weight_n;
        m->w_s_n = base->w_s_n * k;
        m->capacity_nmm = plan->capacity.torque_nm_per_kg * v * 1000.0;
        m->capacity_force_n = m->capacity_nmm / base->native_abductor_arm_mm;
        if (plan->cane.enabled && plan->cane.unit == HL_FORCE_UNIT_PERCENT_BW)
          m->cane_n = hl_force_to_newtons (plan->cane.value, plan->cane.unit, v);
      }
      break;
    case HL_SWEEP_ABDUCTOR_ANGLE_DEG:
      {
        double t = v * DEG;
        m->u_fixed = (HlVec2) { cos (t), -sin (t) };
        m->origin = (HlVec2) { m->insertion.x - HL_VIRTUAL_ORIGIN_MM * m->u_fixed.x,
                               m->insertion.y - HL_VIRTUAL_ORIGIN_MM * m->u_fixed.y };
        /* The force capacity follows the native arm of the new line. */
        HlResult native;
        m->capacity_force_n = INFINITY;
        HlStatus st = hl_model_solve (m, NULL, &native, err);
        if (st != HL_OK)
          return st;
        m->native_abductor_arm_mm = native.abductor_arm_mm;
        m->capacity_force_n = m->capacity_nmm / native.abductor_arm_mm;
      }
      break;
    default:
      break;
    }
  return HL_OK;
}

static void
result_set_nan (HlResult *r)
{
  memset (r, 0, sizeof *r);
  r->abductor_arm_mm = r->bw_arm_mm = r->lever_ratio = NAN;
  r->abductor_force_n = r->abductor_force_bw = NAN;
  r->jrf_x_n = r->jrf_y_n = r->jrf_n = r->jrf_bw = NAN;
  r->moment_ext_nmm = r->unbalanced_nmm = r->x_s_mm = r->demand = NAN;
  r->leg_length_change_mm = r->femoral_offset_change_mm = NAN;
  r->acetabular_offset_change_mm = r->global_offset_change_mm = NAN;
  r->abductor_length_change_mm = NAN;
}

static HlStatus
check_spec (const HlPlan *plan, const HlModel *model, const HlSweepSpec *spec,
            size_t count, const HlResult *results, size_t results_len, HlError *err)
{
  const HlSweepParamInfo *info = hl_sweep_param_info (spec->param);
  if (info == NULL)
    return hl_error_set (err, HL_ERR_INVALID, "sweep parameter",
                         _("Unknown sweep parameter %d"), (int) spec->param);

  char field[HL_ERROR_FIELD_MAX];
  snprintf (field, sizeof field, "sweep %s", info->key);
  if (spec->n_steps < 2 || spec->n_steps > HL_SWEEP_STEPS_MAX)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("A sweep needs 2 to %d steps, not %zu"),
                         HL_SWEEP_STEPS_MAX, spec->n_steps);
  if (spec->n_steps > HL_SWEEP_ROWS_MAX / (1 + plan->n_options))
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("A sweep of %zu values for native and %zu options gives "
                           "%zu rows, more than the %d a sweep may have: use fewer "
                           "values"), spec->n_steps, plan->n_options,
                         spec->n_steps * (1 + plan->n_options), HL_SWEEP_ROWS_MAX);
  if (!isfinite (spec->from) || !isfinite (spec->to))
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The sweep range of %s is not a pair of finite numbers"),
                         _(info->label));

  double max = info->max;
  if (spec->param == HL_SWEEP_CANE_FORCE_N)
    max = model->body_weight_n;
  double lo = fmin (spec->from, spec->to), hi = fmax (spec->from, spec->to);
  if (spec->mode != HL_SWEEP_MODE_SET && spec->mode != HL_SWEEP_MODE_ADD)
    return hl_error_set (err, HL_ERR_INVALID, field, _("Unknown sweep mode %d"),
                         (int) spec->mode);
  if (spec->mode == HL_SWEEP_MODE_ADD && !info->per_option)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("%s is not a setting of the options, so it cannot be "
                           "added to their own settings: sweep it with mode set"),
                         _(info->label));
  if (spec->mode == HL_SWEEP_MODE_ADD)
    {
      for (size_t i = 0; i < plan->n_options; i++)
        {
          double own = recon_get (&plan->options[i].recon, spec->param);
          if (own + lo < info->min || own + hi > max)
            return hl_error_set (err, HL_ERR_INVALID, field,
                                 _("Added to the %g %s of option \"%s\", the sweep "
                                   "of %s from %g to %g %s reaches %g to %g %s, "
                                   "beyond the accepted range %g to %g %s"),
                                 own, info->unit, plan->options[i].name,
                                 _(info->label), spec->from, spec->to, info->unit,
                                 own + lo, own + hi, info->unit, info->min, max,
                                 info->unit);
        }
    }
  else if (lo < info->min || hi > max)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The sweep range of %s, %g to %g %s, leaves the accepted "
                           "range %g to %g %s"), _(info->label), spec->from,
                         spec->to, info->unit, info->min, max, info->unit);
  if (spec->param == HL_SWEEP_ABDUCTOR_ANGLE_DEG && !model->angle_mode)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The abductor line runs from the placed abductor origin "
                           "to the insertion, so its angle is not a free parameter: "
                           "set the line by angle to sweep it"));

  size_t rows = 1 + plan->n_options;
  if (results == NULL || results_len / rows < count)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("The result array holds %zu results; the sweep needs "
                           "%zu (%zu rows of %zu steps)"), results_len,
                         rows * count, rows, count);
  return HL_OK;
}

static void
note_failure (const HlPlan *plan, const HlSweepParamInfo *info, size_t row,
              double value, const HlError *step_err, HlError *err)
{
  if (err == NULL)
    return;
  char where[HL_NAME_MAX + 32];
  if (row == 0)
    snprintf (where, sizeof where, "%s", _("Native"));
  else
    snprintf (where, sizeof where, _("Option \"%s\""), plan->options[row - 1].name);
  hl_error_set (err, step_err->status, step_err->field,
                _("%s at %s = %g %s: %s"), where, info->key, value, info->unit,
                step_err->message);
}

void
hl_sweep_plan_set (HlPlan *plan, HlSweepParam param, double value)
{
  for (size_t i = 0; i < plan->n_options; i++)
    recon_set (&plan->options[i].recon, param, value);
  switch (param)
    {
    case HL_SWEEP_CANE_FORCE_N:
      plan->cane.unit = HL_FORCE_UNIT_N;
      plan->cane.value = value;
      break;
    case HL_SWEEP_CANE_PERCENT_BW:
      plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
      plan->cane.value = value;
      break;
    case HL_SWEEP_LOAD_CONTRA_KG: plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = value; break;
    case HL_SWEEP_LOAD_IPSI_KG: plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = value; break;
    case HL_SWEEP_LOAD_MIDLINE_KG: plan->loads.midline_kg = value; break;
    case HL_SWEEP_LEAN_MM: plan->model.lean_mm = value; break;
    case HL_SWEEP_MASS_KG: plan->mass_kg = value; break;
    case HL_SWEEP_ABDUCTOR_ANGLE_DEG: plan->model.abductor_angle_deg = value; break;
    default: break;
    }
}

HlStatus
hl_sweep_run (const HlPlan *plan, const HlModel *model,
              const HlSweepSpec *spec, double *values,
              HlResult *results, HlStatus *status,
              size_t results_len, HlError *err)
{
  return hl_sweep_run_steps (plan, model, spec, 0, spec->n_steps, values, results,
                             status, results_len, err);
}

HlStatus
hl_sweep_run_steps (const HlPlan *plan, const HlModel *model,
                    const HlSweepSpec *spec, size_t first, size_t count,
                    double *values, HlResult *results, HlStatus *status,
                    size_t results_len, HlError *err)
{
  if (first > spec->n_steps || count > spec->n_steps - first)
    return hl_error_set (err, HL_ERR_INVALID, "sweep",
                         _("Steps %zu to %zu are not in a sweep of %zu values"),
                         first, first + count, spec->n_steps);
  HlStatus st = check_spec (plan, model, spec, count, results, results_len, err);
  if (st != HL_OK)
    return st;

  const HlSweepParamInfo *info = hl_sweep_param_info (spec->param);
  const size_t n = count;
  const size_t rows = 1 + plan->n_options;
  HlStatus first_st = HL_OK;
  HlError step_err = { 0 };
  HlModel m = *model;
  HlResult native;
  HlStatus native_st = HL_OK;

  if (info->per_option)
    native_st = hl_model_solve (model, NULL, &native, &step_err);

  for (size_t i = 0; i < n; i++)
    {
      const double v = hl_sweep_value (spec, first + i);
      HlStatus model_st = HL_OK;

      /* Within the calling thread's time budget (hl-deadline.h), checked
       * every 256 steps: the steps not computed are NaN and refused. */
      if ((i & 255) == 0 && hl_deadline_passed ())
        {
          for (size_t k = i; k < n; k++)
            {
              if (values != NULL)
                values[k] = hl_sweep_value (spec, first + k);
              for (size_t row = 0; row < rows; row++)
                {
                  result_set_nan (&results[row * n + k]);
                  if (status != NULL)
                    status[row * n + k] = HL_ERR_INVALID;
                }
            }
          return hl_deadline_error (err, _("The sweep"));
        }

      if (values != NULL)
        values[i] = v;
      if (!info->per_option)
        {
          m = *model;
          model_st = model_set (&m, model, plan, spec->param, v, &step_err);
        }

      for (size_t row = 0; row < rows; row++)
        {
          HlResult *r = &results[row * n + i];
          if (model_st != HL_OK)
            st = model_st;
          else if (row == 0 && info->per_option)
            {
              st = native_st;
              if (st == HL_OK)
                *r = native;
            }
          else if (row == 0)
            st = hl_model_solve (&m, NULL, r, &step_err);
          else
            {
              HlRecon recon = plan->options[row - 1].recon;
              if (info->per_option)
                {
                  /* vary the numbers a template makes, not its stale copy */
                  HlRecon own = recon;
                  if (hl_recon_resolve (&m, &own, &recon, NULL) != HL_OK)
                    recon = own;
                  recon.tmpl.on = false;
                  recon_set (&recon, spec->param,
                             spec->mode == HL_SWEEP_MODE_ADD
                             ? recon_get (&recon, spec->param) + v : v);
                }
              st = hl_model_solve (&m, &recon, r, &step_err);
            }

          if (status != NULL)
            status[row * n + i] = st;
          if (st != HL_OK)
            {
              result_set_nan (r);
              if (first_st == HL_OK)
                {
                  first_st = st;
                  note_failure (plan, info, row, v, &step_err, err);
                }
            }
        }
    }
  return first_st;
}
