/* hl-solve.c: the single-leg-stance equilibrium (model.md section 6).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-measure.h"
#include "hl-solve.h"
#include "hl-solve-private.h"

#define DEG (M_PI / 180.0)
/* Steeper than this and the teardrops cannot be meant as a horizontal
 * reference: refuse rather than tilt the midline absurdly. */
#define HL_MAX_PELVIC_TILT_DEG 45.0
/* Height above the hip centre at which the weight arrow is drawn. */
#define HL_WEIGHT_DRAW_HEIGHT_MM 60.0

static const struct { const char *key; const char *text; } flag_words[] = {
  { "global-offset-reduced",
    N_("Global offset reduced by more than the tolerance: linked to weaker "
       "abductors (Mahmood et al. 2016)") },
  { "leg-length", N_("Leg length change beyond the tolerance") },
  { "abductors-not-needed",
    N_("Abductors not needed in this posture: the loads balance the pelvis "
       "on their own") },
  { "abductor-slack", N_("Abductors slackened beyond the tolerance") },
  { "over-capacity",
    N_("Abductor demand above capacity: the pelvis cannot be held level in "
       "stance (positive Trendelenburg sign or a compensating lean)") },
  { "implausible",
    N_("Implausible geometry: check the landmarks and the option (the "
       "reasons follow)") },
};

/* Short lines of flag_words, in the same order. */
static const char *const flag_short[] = {
  N_("Global offset reduced"),
  N_("Leg length change beyond tolerance"),
  N_("Abductors not needed"),
  N_("Abductors slackened"),
  N_("Demand above capacity"),
  N_("Implausible geometry"),
};

static const char *const implausible_short[] = {
  N_("abductor moment arm outside about 30-90 mm"),
  N_("hip centre medial to the teardrop"),
  N_("cup moved more than 15 mm"),
  N_("leg length change beyond 20 mm"),
  N_("lever ratio outside about 1-4"),
  N_("joint force more than 40 degrees from vertical"),
};

/* tan (HL_PLAUSIBLE_JRF_ANGLE_DEG): the hot path compares components. */
#define TAN_JRF_ANGLE_LIMIT 0.83909963117728

static int
flag_index (HlFlag flag)
{
  for (int i = 0; (1u << i) <= HL_FLAG_LAST; i++)
    if ((unsigned) flag == (1u << i))
      return i;
  return -1;
}

const char *
hl_flag_key (HlFlag flag)
{
  int i = flag_index (flag);
  return i < 0 ? "" : flag_words[i].key;
}

const char *
hl_flag_short (HlFlag flag)
{
  int i = flag_index (flag);
  return i < 0 ? "" : _(flag_short[i]);
}

const char *
hl_flag_text (HlFlag flag)
{
  int i = flag_index (flag);
  return i < 0 ? "" : _(flag_words[i].text);
}

char *
hl_flags_format (unsigned flags, const char *sep, char *buf, size_t size)
{
  size_t used = 0;

  if (size == 0)
    return buf;
  buf[0] = '\0';
  for (int i = 0; (1u << i) <= HL_FLAG_LAST; i++)
    {
      if (!(flags & (1u << i)))
        continue;
      int n = snprintf (buf + used, size - used, "%s%s", used ? sep : "",
                        flag_words[i].key);
      if (n < 0 || (size_t) n >= size - used)
        break;
      used += (size_t) n;
    }
  return buf;
}

static int
implausible_index (HlImplausible why)
{
  for (int i = 0; (1u << i) <= HL_IMPLAUSIBLE_LAST; i++)
    if ((unsigned) why == (1u << i))
      return i;
  return -1;
}

const char *
hl_implausible_short (HlImplausible why)
{
  int i = implausible_index (why);
  return i < 0 ? "" : _(implausible_short[i]);
}

char *
hl_implausible_describe (const HlResult *res, HlImplausible why, char *buf,
                         size_t size)
{
  if (size == 0)
    return buf;
  buf[0] = '\0';
  switch (why)
    {
    case HL_IMPLAUSIBLE_ABDUCTOR_ARM:
      snprintf (buf, size,
                _("The abductor moment arm is %.1f mm, outside the %.0f-%.0f mm "
                  "of an adult hip (typically 50-60 mm; limits common practice): "
                  "check the hip centre and the abductor origin and insertion."),
                res->abductor_arm_mm, HL_PLAUSIBLE_ABDUCTOR_ARM_MIN_MM,
                HL_PLAUSIBLE_ABDUCTOR_ARM_MAX_MM);
      break;
    case HL_IMPLAUSIBLE_TEARDROP:
      snprintf (buf, size,
                _("The hip centre lies %.1f mm medial to the teardrop, beyond "
                  "the medial wall of the acetabulum (common practice): check "
                  "the hip centre, the teardrop and the cup medialisation."),
                res->teardrop_lateral_mm);
      break;
    case HL_IMPLAUSIBLE_CUP_SHIFT:
      snprintf (buf, size,
                _("The cup moves %.1f mm medially and %.1f mm upwards: more "
                  "than the %.0f mm a reconstruction usually moves it (common "
                  "practice); check the option."),
                -res->acetabular_offset_change_mm, res->cup_height_change_mm,
                HL_PLAUSIBLE_CUP_SHIFT_MM);
      break;
    case HL_IMPLAUSIBLE_LEG_LENGTH:
      snprintf (buf, size,
                _("The leg length changes by %+.1f mm: more than the %.0f mm a "
                  "reconstruction usually changes it (common practice); check "
                  "the option."),
                res->leg_length_change_mm, HL_PLAUSIBLE_LEG_LENGTH_MM);
      break;
    case HL_IMPLAUSIBLE_LEVER_RATIO:
      snprintf (buf, size,
                _("The lever ratio is %.2f, outside about %.0f-%.0f (about 3 in "
                  "Pauwels 1976, near 2 for a typical adult hip; limits common "
                  "practice): check the midline, the hip centre and the "
                  "abductor landmarks."),
                res->lever_ratio, HL_PLAUSIBLE_LEVER_RATIO_MIN,
                HL_PLAUSIBLE_LEVER_RATIO_MAX);
      break;
    case HL_IMPLAUSIBLE_JRF_ANGLE:
      snprintf (buf, size,
                _("The joint force is %.1f degrees from vertical, more than %.0f "
                  "(about 16 degrees in single-leg stance, Pauwels 1976; limit "
                  "common practice): check the abductor line and the loads."),
                hl_result_jrf_angle_deg (res), HL_PLAUSIBLE_JRF_ANGLE_DEG);
      break;
    default:
      break;
    }
  return buf;
}

char *
hl_implausible_describe_all (const HlResult *res, const char *sep, char *buf,
                             size_t size)
{
  size_t used = 0;
  char one[HL_ERROR_MESSAGE_MAX];

  if (size == 0)
    return buf;
  buf[0] = '\0';
  for (unsigned bit = 1; bit != 0 && bit <= HL_IMPLAUSIBLE_LAST; bit <<= 1)
    {
      if (!(res->implausible & bit))
        continue;
      hl_implausible_describe (res, (HlImplausible) bit, one, sizeof one);
      int n = snprintf (buf + used, size - used, "%s%s", used ? sep : "", one);
      if (n < 0 || (size_t) n >= size - used)
        break;
      used += (size_t) n;
    }
  return buf;
}

/* The whole-degree sines and cosines of hl-solve-private.h. */
const double hl_neck_sin_cos[HL_NECK_TABLE_LAST - HL_NECK_TABLE_FIRST + 1][2] = {
  { 1.0, 6.123233995736766e-17 },  /* 90 deg */
  { 0.9998476951563913, -0.017452406437283477 },  /* 91 deg */
  { 0.9993908270190958, -0.034899496702500955 },  /* 92 deg */
  { 0.9986295347545738, -0.05233595624294384 },  /* 93 deg */
  { 0.9975640502598242, -0.06975647374412533 },  /* 94 deg */
  { 0.9961946980917455, -0.08715574274765824 },  /* 95 deg */
  { 0.9945218953682733, -0.10452846326765355 },  /* 96 deg */
  { 0.9925461516413221, -0.12186934340514737 },  /* 97 deg */
  { 0.9902680687415704, -0.13917310096006535 },  /* 98 deg */
  { 0.9876883405951378, -0.1564344650402308 },  /* 99 deg */
  { 0.984807753012208, -0.1736481776669303 },  /* 100 deg */
  { 0.981627183447664, -0.1908089953765448 },  /* 101 deg */
  { 0.9781476007338057, -0.20791169081775934 },  /* 102 deg */
  { 0.9743700647852352, -0.22495105434386503 },  /* 103 deg */
  { 0.9702957262759965, -0.24192189559966779 },  /* 104 deg */
  { 0.9659258262890683, -0.25881904510252085 },  /* 105 deg */
  { 0.9612616959383189, -0.27563735581699905 },  /* 106 deg */
  { 0.9563047559630355, -0.29237170472273666 },  /* 107 deg */
  { 0.9510565162951536, -0.30901699437494734 },  /* 108 deg */
  { 0.9455185755993168, -0.32556815445715664 },  /* 109 deg */
  { 0.9396926207859084, -0.3420201433256687 },  /* 110 deg */
  { 0.9335804264972017, -0.35836794954530027 },  /* 111 deg */
  { 0.9271838545667874, -0.37460659341591207 },  /* 112 deg */
  { 0.9205048534524403, -0.39073112848927377 },  /* 113 deg */
  { 0.9135454576426009, -0.40673664307580026 },  /* 114 deg */
  { 0.90630778703665, -0.42261826174069933 },  /* 115 deg */
  { 0.8987940462991669, -0.4383711467890775 },  /* 116 deg */
  { 0.8910065241883679, -0.4539904997395467 },  /* 117 deg */
  { 0.8829475928589269, -0.4694715627858909 },  /* 118 deg */
  { 0.8746197071393959, -0.484809620246337 },  /* 119 deg */
  { 0.8660254037844387, -0.4999999999999998 },  /* 120 deg */
  { 0.8571673007021123, -0.5150380749100543 },  /* 121 deg */
  { 0.8480480961564261, -0.5299192642332048 },  /* 122 deg */
  { 0.8386705679454239, -0.5446390350150271 },  /* 123 deg */
  { 0.8290375725550417, -0.5591929034707467 },  /* 124 deg */
  { 0.8191520442889917, -0.5735764363510462 },  /* 125 deg */
  { 0.8090169943749475, -0.587785252292473 },  /* 126 deg */
  { 0.7986355100472927, -0.6018150231520484 },  /* 127 deg */
  { 0.788010753606722, -0.6156614753256583 },  /* 128 deg */
  { 0.777145961456971, -0.6293203910498373 },  /* 129 deg */
  { 0.766044443118978, -0.6427876096865394 },  /* 130 deg */
  { 0.7547095802227721, -0.6560590289905072 },  /* 131 deg */
  { 0.7431448254773942, -0.6691306063588582 },  /* 132 deg */
  { 0.7313537016191706, -0.6819983600624984 },  /* 133 deg */
  { 0.7193398003386511, -0.6946583704589974 },  /* 134 deg */
  { 0.7071067811865476, -0.7071067811865475 },  /* 135 deg */
  { 0.6946583704589971, -0.7193398003386512 },  /* 136 deg */
  { 0.6819983600624986, -0.7313537016191705 },  /* 137 deg */
  { 0.6691306063588583, -0.743144825477394 },  /* 138 deg */
  { 0.6560590289905073, -0.754709580222772 },  /* 139 deg */
  { 0.6427876096865395, -0.7660444431189779 },  /* 140 deg */
  { 0.6293203910498374, -0.7771459614569709 },  /* 141 deg */
  { 0.6156614753256584, -0.7880107536067219 },  /* 142 deg */
  { 0.6018150231520482, -0.7986355100472929 },  /* 143 deg */
  { 0.5877852522924732, -0.8090169943749473 },  /* 144 deg */
  { 0.5735764363510459, -0.8191520442889919 },  /* 145 deg */
  { 0.5591929034707469, -0.8290375725550416 },  /* 146 deg */
  { 0.5446390350150273, -0.8386705679454239 },  /* 147 deg */
  { 0.5299192642332049, -0.848048096156426 },  /* 148 deg */
  { 0.5150380749100544, -0.8571673007021122 },  /* 149 deg */
  { 0.49999999999999994, -0.8660254037844387 },  /* 150 deg */
  { 0.48480962024633717, -0.8746197071393957 },  /* 151 deg */
  { 0.4694715627858907, -0.882947592858927 },  /* 152 deg */
  { 0.45399049973954686, -0.8910065241883678 },  /* 153 deg */
  { 0.4383711467890773, -0.898794046299167 },  /* 154 deg */
  { 0.4226182617406995, -0.9063077870366499 },  /* 155 deg */
  { 0.40673664307580043, -0.9135454576426008 },  /* 156 deg */
  { 0.39073112848927377, -0.9205048534524404 },  /* 157 deg */
  { 0.37460659341591224, -0.9271838545667873 },  /* 158 deg */
  { 0.3583679495453002, -0.9335804264972017 },  /* 159 deg */
  { 0.3420201433256689, -0.9396926207859083 },  /* 160 deg */
  { 0.3255681544571566, -0.9455185755993168 },  /* 161 deg */
  { 0.3090169943749475, -0.9510565162951535 },  /* 162 deg */
  { 0.2923717047227366, -0.9563047559630355 },  /* 163 deg */
  { 0.2756373558169992, -0.9612616959383189 },  /* 164 deg */
  { 0.258819045102521, -0.9659258262890682 },  /* 165 deg */
  { 0.24192189559966773, -0.9702957262759965 },  /* 166 deg */
  { 0.2249510543438652, -0.9743700647852351 },  /* 167 deg */
  { 0.20791169081775931, -0.9781476007338057 },  /* 168 deg */
  { 0.19080899537654497, -0.981627183447664 },  /* 169 deg */
  { 0.17364817766693028, -0.984807753012208 },  /* 170 deg */
};

double
hl_recon_total_offset (const HlRecon *r)
{
  double offset, length;
  hl_recon_femur_shift (r, &offset, &length);
  return offset;
}

double
hl_recon_total_length (const HlRecon *r)
{
  double offset, length;
  hl_recon_femur_shift (r, &offset, &length);
  return length;
}

static inline HlVec2
to_solver (double side_sign, HlVec2 hc, HlVec2 p)
{
  return (HlVec2) { side_sign * (p.x - hc.x), p.y - hc.y };
}

HlStatus
hl_model_prepare (HlModel *m, const HlPlan *plan, HlError *err)
{
  HlStatus st = hl_plan_check (plan, err);
  if (st != HL_OK)
    return st;

  const HlLandmarks *lm = &plan->landmarks;
  memset (m, 0, sizeof *m);
  m->side_sign = plan->side == HL_SIDE_RIGHT ? -1.0 : 1.0;
  m->hip_centre = lm->p[HL_LM_HIP_CENTRE];
  hl_template_frame (lm, plan->side, &m->tframe);

  HlVec2 hc = m->hip_centre;
  m->insertion = to_solver (m->side_sign, hc, lm->p[HL_LM_ABDUCTOR_INSERTION]);
  m->midline = to_solver (m->side_sign, hc, lm->p[HL_LM_MIDLINE]);

  /* The midline runs perpendicular to the inter-teardrop line when both
   * teardrops are placed, else vertically. */
  m->midline_slope = 0.0;
  if (hl_landmarks_has (lm, HL_LM_TEARDROP) && hl_landmarks_has (lm, HL_LM_TEARDROP_OTHER))
    {
      HlVec2 a = to_solver (m->side_sign, hc, lm->p[HL_LM_TEARDROP]);
      HlVec2 b = to_solver (m->side_sign, hc, lm->p[HL_LM_TEARDROP_OTHER]);
      double dx = b.x - a.x, dy = b.y - a.y;
      if (fabs (dx) < 1e-9 || fabs (atan2 (dy, fabs (dx))) > HL_MAX_PELVIC_TILT_DEG * DEG)
        return hl_error_set (err, HL_ERR_DEGENERATE, "landmark teardrop",
                             _("The inter-teardrop line is tilted more than %.0f "
                               "degrees: check both teardrops"),
                             HL_MAX_PELVIC_TILT_DEG);
      /* The perpendicular (-dy, dx) has dx/dy slope -dy/dx. */
      m->midline_slope = -dy / dx;
    }

  m->angle_mode = plan->model.abductor_line == HL_ABDUCTOR_LINE_ANGLE
                  || !hl_landmarks_has (lm, HL_LM_ABDUCTOR_ORIGIN);
  if (m->angle_mode)
    {
      double t = plan->model.abductor_angle_deg * DEG;
      m->u_fixed = (HlVec2) { cos (t), -sin (t) };
      m->origin = (HlVec2) { m->insertion.x - HL_VIRTUAL_ORIGIN_MM * m->u_fixed.x,
                             m->insertion.y - HL_VIRTUAL_ORIGIN_MM * m->u_fixed.y };
    }
  else
    m->origin = to_solver (m->side_sign, hc, lm->p[HL_LM_ABDUCTOR_ORIGIN]);

  double f = hl_plan_limb_fraction (plan);
  m->body_weight_n = hl_plan_body_weight (plan);
  m->inv_body_weight = 1.0 / m->body_weight_n;
  m->w_s_n = m->body_weight_n * (1.0 - f);
  m->bw_line_factor = plan->model.bw_line == HL_BW_LINE_SEGMENTAL ? 1.0 / (1.0 - f) : 1.0;
  m->lean_mm = plan->model.lean_mm;

  m->cane_n = hl_plan_cane_force (plan);
  m->cane_dx = m->cane_n == 0.0 ? 0.0 : plan->cane.hand == HL_HAND_CONTRALATERAL
               ? -plan->cane.distance_mm : plan->cane.distance_mm;
  for (int h = 0; h < 2; h++)
    {
      m->load_n[h] = plan->loads.hand[h].mass_kg * HL_GRAVITY;
      m->load_dx[h] = h == HL_HAND_CONTRALATERAL
                      ? -plan->loads.hand[h].distance_mm
                      : plan->loads.hand[h].distance_mm;
    }
  m->load_midline_n = plan->loads.midline_kg * HL_GRAVITY;
  m->tol = plan->tol;
  m->teardrop_x = NAN;
  if (hl_landmarks_has (lm, HL_LM_TEARDROP))
    m->teardrop_x = to_solver (m->side_sign, hc, lm->p[HL_LM_TEARDROP]).x;

  HlMeasures meas;
  hl_measure (lm, plan->side, &meas);
  m->native_femoral_offset_mm = meas.operated.femoral_offset_mm;
  m->native_global_offset_mm = meas.operated.global_offset_mm;
  m->other_global_offset_mm = meas.other.global_offset_mm;
  m->native_leg_length_difference_mm = meas.leg_length_difference_mm;
  m->go_drop_base = 0.0;
  if (isfinite (m->other_global_offset_mm) && isfinite (m->native_global_offset_mm))
    m->go_drop_base = m->other_global_offset_mm - m->native_global_offset_mm;
  m->lld_base = isfinite (m->native_leg_length_difference_mm)
                ? m->native_leg_length_difference_mm : 0.0;

  double dx = m->insertion.x - m->origin.x, dy = m->insertion.y - m->origin.y;
  m->native_abductor_length_mm = sqrt (dx * dx + dy * dy);

  /* Capacity is needed by the solve; solve native once with none, then
   * derive the force capacity from the native arm. */
  m->capacity_nmm = plan->capacity.torque_nm_per_kg * plan->mass_kg * 1000.0;
  m->capacity_force_n = INFINITY;
  HlResult native;
  st = hl_model_solve (m, NULL, &native, err);
  if (st != HL_OK)
    return st;
  m->native_abductor_arm_mm = native.abductor_arm_mm;
  m->capacity_force_n = m->capacity_nmm / native.abductor_arm_mm;
  return HL_OK;
}

HlStatus
hl_model_solve (const HlModel *m, const HlRecon *recon, HlResult *res, HlError *err)
{
  double cm = 0.0, cs = 0.0, fo = 0.0, fl = 0.0;
  if (recon != NULL && recon->tmpl.on && recon->tmpl.resolved)
    {
      HlTemplateGeometry g;
      HlStatus st = hl_template_derive (&m->tframe, &recon->tmpl, &g, err);
      if (st != HL_OK)
        return st;
      cm = g.cup_medial_mm;
      cs = g.cup_superior_mm;
      fo = g.femoral_offset_mm;
      fl = g.femoral_length_mm;
      if (!isfinite (cm + cs + fo + fl))
        return hl_error_set (err, HL_ERR_INVALID, "option",
                             _("A reconstruction parameter is not a finite number"));
    }
  else if (recon != NULL)
    {
      cm = recon->cup_medial_mm;
      cs = recon->cup_superior_mm;
      hl_recon_femur_shift (recon, &fo, &fl);
      if (!isfinite (cm + cs + fo + fl))
        return hl_error_set (err, HL_ERR_INVALID, "option",
                             _("A reconstruction parameter is not a finite number"));
    }

  /* Relative to the new hip centre, pelvic points move by (+c_med, -c_sup)
   * and femoral points by (+f_off, -f_len). */
  const double ox = m->origin.x + cm, oy = m->origin.y - cs;
  const double ix = m->insertion.x + fo, iy = m->insertion.y - fl;
  const double xm = (m->midline.x + cm) - (m->midline.y - cs) * m->midline_slope;

  if (!(xm < 0.0))
    return hl_error_set (err, HL_ERR_DEGENERATE, "landmark midline",
                           _("The midline lies %.1f mm lateral to the hip centre, on "
                             "the operated side: check the midline point, the hip "
                             "centre and the operated side"), xm);

  const double dx = ix - ox, dy = iy - oy;
  const double len = sqrt (dx * dx + dy * dy);
  /* cross = (origin x (insertion - origin))_z = r_a |insertion - origin|:
   * working with it spares the divisions that normalising u would cost. */
  double ra, cross, ux, uy;
  if (m->angle_mode)
    {
      ux = m->u_fixed.x;
      uy = m->u_fixed.y;
      ra = ix * uy - iy * ux;
      cross = ra;
    }
  else
    {
      if (len < HL_MIN_ABDUCTOR_LENGTH_MM)
        return hl_error_set (err, HL_ERR_DEGENERATE, "landmark abductor-origin",
                             _("The abductor origin and insertion are %.1f mm apart "
                               "(at least 20 mm needed): check the abductor origin "
                               "and insertion"), len);
      ux = dx;
      uy = dy;
      cross = ox * dy - oy * dx;
      ra = cross / len;
    }

  /* A working abductor line passes lateral to the hip centre, which gives
   * a negative (clockwise) arm in the solver frame. */
  if (ra > -HL_MIN_ABDUCTOR_ARM_MM)
    {
      if (ra >= HL_MIN_ABDUCTOR_ARM_MM)
        return hl_error_set (err, HL_ERR_DEGENERATE, "landmark abductor-insertion",
                             _("The abductor line passes %.1f mm medial to the hip "
                               "centre, so the abductors could not hold the pelvis: "
                               "check the abductor origin and insertion"), ra);
      return hl_error_set (err, HL_ERR_DEGENERATE, "landmark abductor-insertion",
                           _("The abductor moment arm is %.1f mm: the abductor line "
                             "passes almost through the hip centre; check the "
                             "abductor origin and insertion"), fabs (ra));
    }

  const double xs = xm * m->bw_line_factor + m->lean_mm;
  const double fy_ext = -m->w_s_n + m->cane_n - m->load_n[0] - m->load_n[1]
                        - m->load_midline_n;
  const double moment = -m->w_s_n * xs
                        + m->cane_n * (xm + m->cane_dx)
                        - m->load_n[0] * (xm + m->load_dx[0])
                        - m->load_n[1] * (xm + m->load_dx[1])
                        - m->load_midline_n * xm;

  /* F_a = -M / r_a; F_a u = k (ux, uy) with k = -M / cross, where (ux, uy)
   * is the unnormalised line in the origin-insertion case. */
  unsigned flags = 0;
  const double inv_cross = 1.0 / cross;
  const double arm_scale = m->angle_mode ? 1.0 : len;   /* cross = r_a arm_scale */
  double k = -moment * inv_cross;
  res->unbalanced_nmm = 0.0;
  if (k < 0.0)
    {
      res->unbalanced_nmm = moment;
      k = 0.0;
      flags |= HL_FLAG_ABDUCTORS_NOT_NEEDED;
    }
  const double fa = k * arm_scale;

  const double jx = -k * ux;
  const double jy = -(k * uy + fy_ext);

  res->abductor_arm_mm = -ra;
  res->bw_arm_mm = fabs (xs);
  res->lever_ratio = -res->bw_arm_mm * arm_scale * inv_cross;
  res->abductor_force_n = fa;
  res->abductor_force_bw = fa * m->inv_body_weight;
  res->jrf_x_n = jx;
  res->jrf_y_n = jy;
  res->jrf_n = sqrt (jx * jx + jy * jy);
  res->jrf_bw = res->jrf_n * m->inv_body_weight;
  res->moment_ext_nmm = moment;
  res->x_s_mm = xs;
  res->demand = fa / m->capacity_force_n;

  res->leg_length_change_mm = fl - cs;
  res->femoral_offset_change_mm = fo;
  res->acetabular_offset_change_mm = -cm;
  res->global_offset_change_mm = fo - cm;
  res->abductor_length_change_mm = len - m->native_abductor_length_mm;

  /* Against the other hip where it is measured, else against native. */
  if (m->go_drop_base - res->global_offset_change_mm > m->tol.global_offset_drop_mm)
    flags |= HL_FLAG_GLOBAL_OFFSET_REDUCED;
  if (fabs (m->lld_base + res->leg_length_change_mm) > m->tol.leg_length_mm)
    flags |= HL_FLAG_LEG_LENGTH;

  if (res->abductor_length_change_mm < -m->tol.abductor_slack_mm)
    flags |= HL_FLAG_ABDUCTOR_SLACK;
  if (res->demand > 1.0)
    flags |= HL_FLAG_OVER_CAPACITY;

  /* Plausibility: wide limits, each named in hl-solve.h. */
  unsigned why = 0;
  res->cup_height_change_mm = cs;
  res->teardrop_lateral_mm = m->teardrop_x + cm;
  if (!(res->abductor_arm_mm >= HL_PLAUSIBLE_ABDUCTOR_ARM_MIN_MM
        && res->abductor_arm_mm <= HL_PLAUSIBLE_ABDUCTOR_ARM_MAX_MM))
    why |= HL_IMPLAUSIBLE_ABDUCTOR_ARM;
  if (res->teardrop_lateral_mm > 0.0)
    why |= HL_IMPLAUSIBLE_TEARDROP;
  if (fabs (cm) > HL_PLAUSIBLE_CUP_SHIFT_MM || fabs (cs) > HL_PLAUSIBLE_CUP_SHIFT_MM)
    why |= HL_IMPLAUSIBLE_CUP_SHIFT;
  if (fabs (res->leg_length_change_mm) > HL_PLAUSIBLE_LEG_LENGTH_MM)
    why |= HL_IMPLAUSIBLE_LEG_LENGTH;
  if (!(res->lever_ratio >= HL_PLAUSIBLE_LEVER_RATIO_MIN
        && res->lever_ratio <= HL_PLAUSIBLE_LEVER_RATIO_MAX))
    why |= HL_IMPLAUSIBLE_LEVER_RATIO;
  if (fabs (jx) > TAN_JRF_ANGLE_LIMIT * fabs (jy))
    why |= HL_IMPLAUSIBLE_JRF_ANGLE;
  if (why != 0)
    flags |= HL_FLAG_IMPLAUSIBLE;

  res->implausible = why;
  res->flags = flags;
  return HL_OK;
}

double
hl_result_jrf_angle_deg (const HlResult *res)
{
  return atan2 (fabs (res->jrf_x_n), fabs (res->jrf_y_n)) / DEG;
}

const char *
hl_result_jrf_sense (const HlResult *res)
{
  if (res->jrf_y_n < 0.0)
    return _("the joint is pulled apart: the upward forces exceed the weight "
             "above the hip, outside what this model describes");
  if (res->jrf_x_n <= 0.0)
    return _("the femoral head is loaded downwards and laterally (the usual sense)");
  return _("the femoral head is loaded downwards and medially");
}

void
hl_recon_landmarks (const HlPlan *plan, const HlRecon *recon, HlLandmarks *out)
{
  *out = plan->landmarks;
  if (recon == NULL)
    return;
  HlRecon resolved;
  if (recon->tmpl.on && recon->tmpl.resolved)
    {
      HlTemplateFrame f;
      HlTemplateGeometry g;
      hl_template_frame (&plan->landmarks, plan->side, &f);
      if (hl_template_derive (&f, &recon->tmpl, &g, NULL) == HL_OK)
        {
          resolved = *recon;
          hl_template_geometry_to_recon (&g, &recon->tmpl, &resolved);
          recon = &resolved;
        }
    }

  const double s = plan->side == HL_SIDE_RIGHT ? -1.0 : 1.0;
  const HlVec2 cup = { -s * recon->cup_medial_mm, recon->cup_superior_mm };
  const HlVec2 femur = { cup.x + s * hl_recon_total_offset (recon),
                         cup.y - hl_recon_total_length (recon) };

  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      HlVec2 d;
      if (i == HL_LM_HIP_CENTRE)
        d = cup;          /* the head sits in the cup */
      else if (info->segment == HL_SEGMENT_FEMUR)
        d = femur;
      else
        continue;
      out->p[i].x += d.x;
      out->p[i].y += d.y;
    }
}

void
hl_row_measures (const HlPlan *plan, size_t row, HlMeasures *out)
{
  HlLandmarks lm;
  if (row == 0)
    lm = plan->landmarks;
  else
    hl_recon_landmarks (plan, &plan->options[row - 1].recon, &lm);
  hl_measure (&lm, plan->side, out);
}

static HlVec2
to_plan (const HlModel *m, HlVec2 hc_new, double x_lat, double y)
{
  return (HlVec2) { hc_new.x + m->side_sign * x_lat, hc_new.y + y };
}

void
hl_model_forces (const HlModel *m, const HlPlan *plan, const HlRecon *recon,
                 const HlResult *res, HlForceSet *out)
{
  (void) plan;
  double cm = 0.0, cs = 0.0, fo = 0.0, fl = 0.0;
  HlRecon resolved;
  if (recon != NULL && hl_recon_resolve (m, recon, &resolved, NULL) == HL_OK)
    recon = &resolved;
  if (recon != NULL)
    {
      cm = recon->cup_medial_mm;
      cs = recon->cup_superior_mm;
      fo = hl_recon_total_offset (recon);
      fl = hl_recon_total_length (recon);
    }

  const double s = m->side_sign;
  const HlVec2 hc = { m->hip_centre.x - s * cm, m->hip_centre.y + cs };
  const double xm = (m->midline.x + cm) - (m->midline.y - cs) * m->midline_slope;
  const HlVec2 o = { m->origin.x + cm, m->origin.y - cs };
  const HlVec2 ins = { m->insertion.x + fo, m->insertion.y - fl };
  HlVec2 u;
  if (m->angle_mode)
    u = m->u_fixed;
  else
    {
      double dx = ins.x - o.x, dy = ins.y - o.y, len = sqrt (dx * dx + dy * dy);
      u = (HlVec2) { dx / len, dy / len };
    }

  memset (out, 0, sizeof *out);
  out->hip_centre = hc;
  out->abductor_insertion = to_plan (m, hc, ins.x, ins.y);
  out->abductor_origin = m->angle_mode
    ? to_plan (m, hc, ins.x - HL_VIRTUAL_ORIGIN_MM * u.x, ins.y - HL_VIRTUAL_ORIGIN_MM * u.y)
    : to_plan (m, hc, o.x, o.y);
  out->midline_x_at_hip = to_plan (m, hc, xm, 0.0).x;

  const double bw = m->inv_body_weight;
  HlForce *f = out->f;
  int n = 0;

  f[n++] = (HlForce) { HL_FORCE_WEIGHT, to_plan (m, hc, res->x_s_mm, HL_WEIGHT_DRAW_HEIGHT_MM),
                       { 0.0, -m->w_s_n }, m->w_s_n * bw };
  f[n++] = (HlForce) { HL_FORCE_ABDUCTOR, out->abductor_origin,
                       { s * res->abductor_force_n * u.x, res->abductor_force_n * u.y },
                       res->abductor_force_bw };
  f[n++] = (HlForce) { HL_FORCE_JOINT, hc, { s * res->jrf_x_n, res->jrf_y_n }, res->jrf_bw };
  if (m->cane_n > 0.0)
    f[n++] = (HlForce) { HL_FORCE_CANE, to_plan (m, hc, xm + m->cane_dx, 0.0),
                         { 0.0, m->cane_n }, m->cane_n * bw };
  static const HlForceKind hand_kind[2] = { HL_FORCE_LOAD_CONTRA, HL_FORCE_LOAD_IPSI };
  for (int h = 0; h < 2; h++)
    if (m->load_n[h] > 0.0)
      f[n++] = (HlForce) { hand_kind[h], to_plan (m, hc, xm + m->load_dx[h], 0.0),
                           { 0.0, -m->load_n[h] }, m->load_n[h] * bw };
  if (m->load_midline_n > 0.0)
    f[n++] = (HlForce) { HL_FORCE_LOAD_MIDLINE,
                         to_plan (m, hc, xm, HL_WEIGHT_DRAW_HEIGHT_MM),
                         { 0.0, -m->load_midline_n }, m->load_midline_n * bw };
  out->n = n;
}

const char *
hl_force_label (HlForceKind kind)
{
  static const char *const labels[HL_FORCE_N] = {
    N_("Superincumbent weight"),
    N_("Abductor pull"),
    N_("Joint reaction force"),
    N_("Cane"),
    N_("Load, opposite hand"),
    N_("Load, same-side hand"),
    N_("Load on the midline"),
  };
  if ((int) kind < 0 || kind >= HL_FORCE_N)
    return "";
  return _(labels[kind]);
}

void
hl_solve_refusal (HlError *err, const HlPlan *plan, size_t row)
{
  if (err == NULL)
    return;
  char field[HL_ERROR_FIELD_MAX + HL_NAME_MAX + 32];
  char where[HL_NAME_MAX + 16];
  if (row == 0)
    snprintf (where, sizeof where, "%s", _("native"));
  else
    snprintf (where, sizeof where, _("option \"%s\""), plan->options[row - 1].name);
  if (err->field[0] != '\0')
    snprintf (field, sizeof field, "%s: %s", where, err->field);
  else
    snprintf (field, sizeof field, "%s", where);
  /* cut to the room there is (an option name is at most HL_NAME_MAX) */
  size_t n = strlen (field);
  if (n >= sizeof err->field)
    n = sizeof err->field - 1;
  memcpy (err->field, field, n);
  err->field[n] = '\0';
}

HlStatus
hl_model_solve_row (const HlModel *model, const HlPlan *plan, size_t row,
                    HlResult *res, HlError *err)
{
  hl_error_clear (err);
  HlStatus st = hl_model_solve (model, row == 0 ? NULL : &plan->options[row - 1].recon,
                                res, err);
  if (st != HL_OK)
    {
      memset (res, 0, sizeof *res);
      hl_solve_refusal (err, plan, row);
    }
  return st;
}

HlStatus
hl_model_solve_rows (const HlModel *model, const HlPlan *plan,
                     HlResult *results, HlStatus *status, HlError *errors)
{
  HlStatus first = HL_OK;

  for (size_t i = 0; i <= plan->n_options; i++)
    {
      HlStatus st = hl_model_solve_row (model, plan, i, &results[i],
                                        errors != NULL ? &errors[i] : NULL);
      if (st != HL_OK && first == HL_OK)
        first = st;
      if (status != NULL)
        status[i] = st;
    }
  return first;
}

HlStatus
hl_recon_resolve (const HlModel *model, const HlRecon *recon, HlRecon *out,
                  HlError *err)
{
  *out = *recon;
  if (!recon->tmpl.on || !recon->tmpl.resolved)
    return HL_OK;
  HlTemplateGeometry g;
  HlStatus st = hl_template_derive (&model->tframe, &recon->tmpl, &g, err);
  if (st == HL_OK)
    hl_template_geometry_to_recon (&g, &recon->tmpl, out);
  return st;
}

HlStatus
hl_plan_solve_all (const HlPlan *plan, HlResult *results, HlError *err)
{
  HlModel model;
  HlStatus st = hl_model_prepare (&model, plan, err);
  if (st != HL_OK)
    return st;
  for (size_t i = 0; i <= plan->n_options; i++)
    if ((st = hl_model_solve_row (&model, plan, i, &results[i], err)) != HL_OK)
      return st;
  return HL_OK;
}
