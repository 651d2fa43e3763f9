/* hl-render.c: the schematic with cairo.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The bones are templates laid over the landmarks: each half of the pelvis
 * is scaled so that its acetabulum sits on that side's hip centre and its
 * iliac wing follows the abductor origin; each femur is built from its hip
 * centre, greater trochanter (the abductor insertion), lesser trochanter
 * and shaft axis, with typical proportions wherever a landmark is missing.
 * The shapes are for orientation only: no number is read off them.
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include <cairo-svg.h>

#include "hl-i18n.h"
#include "hl-render.h"
#include "hl-underlay.h"
#include "hl-version.h"

/* ---- Proportions of the drawn bones ------------------------------------
 * Typical adult proportions, from memory: they shape the picture only. */

/* The hemipelvis template has its hip centre this far from the midline and
 * its abductor origin at (TEMPLATE_ORIGIN_U, TEMPLATE_ORIGIN_V), mm. */
#define TEMPLATE_HIP_U 95.0
#define TEMPLATE_ORIGIN_U 115.0
#define TEMPLATE_ORIGIN_V 90.0
/* How far the iliac wing may stretch or shift to follow the origin. */
#define WING_STRETCH_MIN 0.75
#define WING_STRETCH_MAX 1.35
#define WING_SHIFT_MAX_MM 30.0
#define WING_WARP_START_V 20.0
#define WING_WARP_SPAN_V 70.0
/* Teardrops closer than this do not define a tilt of the pelvis. */
#define TEARDROP_MIN_SEPARATION_MM 20.0
#define PELVIS_SCALE_MIN 0.4
#define PELVIS_SCALE_MAX 2.5
#define ACETABULUM_RADIUS_MM 27.0

/* Proximal shaft axis tilted laterally from the vertical. */
#define SHAFT_TILT_DEFAULT_DEG 5.0
/* Mean adult femoral offset about 43 mm: Noble et al. 1988, Clin Orthop
 * 235:148-165 (recalled). */
#define FEMORAL_OFFSET_DEFAULT_MM 43.0
#define FEMORAL_OFFSET_DRAW_MIN_MM 12.0
#define HEAD_RADIUS_MM 24.0
#define NECK_HALF_WIDTH_RATIO 0.62
#define SHAFT_HALF_WIDTH_MM 14.0
#define SHAFT_LENGTH_MIN_MM 150.0
#define SHAFT_BEYOND_DISTAL_MM 25.0
#define SHAFT_POINTS_MIN_SEPARATION_MM 10.0
/* Cup of an option: rim 40 degrees to the horizontal (common practice). */
#define CUP_INCLINATION_DEG 40.0
#define CUP_WALL_MM 4.0

/* ---- Drawing in px ----------------------------------------------------- */

#define BONE_LINE_PX (1.4 * px_size)
#define BONE_FILL_ALPHA 0.07
#define BONE_LINE_ALPHA 0.72
#define NATIVE_GHOST_ALPHA 0.45
#define CONSTRUCTION_LINE_PX (1.0 * px_size)
#define CONSTRUCTION_ALPHA 0.65
#define MIDLINE_ALPHA 0.45
#define ARROW_JOINT_PX (3.2 * px_size)
#define ARROW_PX (2.4 * px_size)
#define ARROW_HEAD_MIN_PX (9.0 * px_size)
#define ARROW_HEAD_PER_WIDTH 3.6
#define FORCE_DRAW_MIN_BW 0.005
#define HANDLE_OPTIONAL_RADIUS_PX (4.8 * px_size)
#define HANDLE_HOVER_HALO_PX (5.0 * px_size)
#define HANDLE_SELECT_RING_PX (4.0 * px_size)
#define MARKER_HALF_PX (4.0 * px_size)
#define ABDUCTOR_LINE_EXTEND_MM 25.0
#define LABEL_PAD_PX (3.0 * px_size)
#define LABEL_GAP_PX (6.0 * px_size)
#define BOX_MARGIN_PX (12.0 * px_size)
#define ERROR_BOX_MAX_PX (520.0 * px_size)
#define SIDE_MARKER_PX (26.0 * px_size)
#define SCALE_BAR_MIN_PX (60.0 * px_size)
#define SCALE_BAR_MAX_PX (170.0 * px_size)
#define SCALE_BAR_PREFERRED_MM 50.0
#define MOVED_MIN_MM 0.05
#define WRAP_LINES_MAX 16
#define FIT_MARGIN_PX (24.0 * px_size)
/* Flattening of curves: invisible at this size, and faster than cairo's
 * default of 0.1 px. */
#define CURVE_TOLERANCE_PX 0.5

/* Every size in px below is multiplied by the style's `size` (1 on
 * screen; set by hl_render_style_for_target for figures, slides and the
 * report), so that markers, lines, gaps and bands scale with the text.
 * Set at each public entry point; one drawing per thread at a time. */
static _Thread_local double px_size = 1.0;
#define HANDLE_RADIUS_PX (HL_RENDER_HANDLE_RADIUS_PX * px_size)

#define DEG (M_PI / 180.0)
#define N_ELEMENTS(a) (sizeof (a) / sizeof ((a)[0]))

/* ---- Small vector helpers ---------------------------------------------- */

static inline HlVec2 v2 (double x, double y) { return (HlVec2) { x, y }; }
static inline HlVec2 vadd (HlVec2 a, HlVec2 b) { return v2 (a.x + b.x, a.y + b.y); }
static inline HlVec2 vsub (HlVec2 a, HlVec2 b) { return v2 (a.x - b.x, a.y - b.y); }
static inline HlVec2 vmul (HlVec2 a, double k) { return v2 (a.x * k, a.y * k); }
static inline double vdot (HlVec2 a, HlVec2 b) { return a.x * b.x + a.y * b.y; }
static inline double vlen (HlVec2 a) { return hypot (a.x, a.y); }

static HlVec2
vunit (HlVec2 a, HlVec2 fallback)
{
  double l = vlen (a);
  if (!(l > 1e-9) || !isfinite (l))
    return fallback;
  return vmul (a, 1.0 / l);
}

/* a + b * k1 + c * k2 */
static inline HlVec2
vcomb (HlVec2 a, HlVec2 b, double k1, HlVec2 c, double k2)
{
  return v2 (a.x + b.x * k1 + c.x * k2, a.y + b.y * k1 + c.y * k2);
}

static double
clampd (double v, double lo, double hi)
{
  return v < lo ? lo : v > hi ? hi : v;
}

static bool
vfinite (HlVec2 a)
{
  return isfinite (a.x) && isfinite (a.y);
}

/* ---- Style -------------------------------------------------------------- */

void
hl_render_style_init (HlRenderStyle *style, bool dark)
{
  memset (style, 0, sizeof *style);
  style->dark = dark;
  if (dark)
    {
      style->fg = (HlRgba) { 0.92, 0.92, 0.90, 1.0 };
      style->bg = (HlRgba) { 0.13, 0.13, 0.14, 1.0 };
    }
  else
    {
      style->fg = (HlRgba) { 0.10, 0.11, 0.12, 1.0 };
      style->bg = (HlRgba) { 1.0, 1.0, 1.0, 1.0 };
    }
  style->paint_background = true;
  style->show_caution = false;
  style->show_frame = true;
  style->show_legend = true;
  style->show_labels = true;
  style->hover_landmark = -1;
  style->selected_landmark = -1;
  style->hover_template = -1;
  style->selected_template = -1;
  style->font_px = 12.0;
  style->size = 1.0;
  style->layout = NULL;
}

/* The smallest text of the drawing (the side words under R and L) against
 * the base size: every text is at least this times font_px. */
#define SMALLEST_TEXT_SCALE 0.8
/* The default figure keeps the screen's sizes: 12 px text at 1200 x 900. */
#define TARGET_REF_WIDTH 1200.0
#define TARGET_REF_HEIGHT 900.0
#define TARGET_REF_FONT_PX 12.0
#define TARGET_FONT_MAX_PX 48.0

void
hl_render_style_for_target (HlRenderStyle *style, double width, double height,
                            HlRenderPreset preset)
{
  double k = fmin (width / TARGET_REF_WIDTH, height / TARGET_REF_HEIGHT);
  if (!(k > 0.0))
    k = 1.0;
  double font = TARGET_REF_FONT_PX * k;
  if (preset == HL_RENDER_PRESET_SLIDE || preset == HL_RENDER_PRESET_HALF_SLIDE)
    font = fmax (font, HL_RENDER_SLIDE_TEXT_PX / SMALLEST_TEXT_SCALE);
  font = fmin (fmax (font, HL_RENDER_TEXT_MIN_PX / SMALLEST_TEXT_SCALE), TARGET_FONT_MAX_PX);
  style->font_px = font;
  style->size = font / TARGET_REF_FONT_PX;
}

void
hl_render_preset_size (HlRenderPreset preset, int *width, int *height)
{
  if (preset == HL_RENDER_PRESET_SLIDE)
    *width = 1920, *height = 1080;
  else if (preset == HL_RENDER_PRESET_HALF_SLIDE)
    *width = 960, *height = 1080;
}

static void
layout_add (const HlRenderStyle *style, HlBoxKind kind, double x, double y,
            double w, double h)
{
  HlRenderLayout *l = style->layout;
  if (l != NULL && l->n < HL_RENDER_LAYOUT_MAX)
    l->box[l->n++] = (HlRenderBox) { kind, x, y, w, h };
}

/* a over b at `alpha`, opaque. */
static HlRgba
mix (HlRgba b, HlRgba a, double alpha)
{
  return (HlRgba) { b.r + (a.r - b.r) * alpha, b.g + (a.g - b.g) * alpha,
                    b.b + (a.b - b.b) * alpha, 1.0 };
}

static void
set_rgba (cairo_t *cr, HlRgba c, double alpha)
{
  cairo_set_source_rgba (cr, c.r, c.g, c.b, c.a * alpha);
}

/* ---- Point lists and smooth outlines ------------------------------------ */

#define POLY_MAX 128

typedef struct {
  HlVec2 p[POLY_MAX];
  int n;
} Poly;

static void
poly_add (Poly *poly, HlVec2 p)
{
  if (poly->n < POLY_MAX && vfinite (p))
    poly->p[poly->n++] = p;
}

static void
poly_bounds (const Poly *poly, double b[4])
{
  for (int i = 0; i < poly->n; i++)
    {
      b[0] = fmin (b[0], poly->p[i].x);
      b[1] = fmin (b[1], poly->p[i].y);
      b[2] = fmax (b[2], poly->p[i].x);
      b[3] = fmax (b[3], poly->p[i].y);
    }
}

/* A Catmull-Rom spline through the points as cubic Beziers; a point given
 * twice makes a corner. */
static void
path_spline (cairo_t *cr, const HlView *view, const Poly *poly, bool closed)
{
  int n = poly->n;
  if (n < 2)
    return;
  HlVec2 s[POLY_MAX];
  for (int i = 0; i < n; i++)
    s[i] = hl_view_to_screen (view, poly->p[i]);

  cairo_move_to (cr, s[0].x, s[0].y);
  int segments = closed ? n : n - 1;
  for (int i = 0; i < segments; i++)
    {
      int i0 = closed ? (i - 1 + n) % n : (i > 0 ? i - 1 : 0);
      int i1 = i;
      int i2 = (i + 1) % n;
      int i3 = closed ? (i + 2) % n : (i + 2 < n ? i + 2 : n - 1);
      HlVec2 c1 = v2 (s[i1].x + (s[i2].x - s[i0].x) / 6.0,
                      s[i1].y + (s[i2].y - s[i0].y) / 6.0);
      HlVec2 c2 = v2 (s[i2].x - (s[i3].x - s[i1].x) / 6.0,
                      s[i2].y - (s[i3].y - s[i1].y) / 6.0);
      cairo_curve_to (cr, c1.x, c1.y, c2.x, c2.y, s[i2].x, s[i2].y);
    }
  if (closed)
    cairo_close_path (cr);
}

/* ---- The pelvis ---------------------------------------------------------- */

/* Right-handed template of one hemipelvis: u lateral from the midline, v up
 * from the hip centre's level, mm, for a hip centre at TEMPLATE_HIP_U. */
static const double hemipelvis_outline[][2] = {
  { 40, 112 }, { 58, 126 }, { 86, 135 }, { 114, 129 }, { 133, 112 },
  { 140, 92 }, { 135, 72 }, { 128, 62 }, { 128, 62 }, { 127, 50 },
  { 122, 36 }, { 121, 20 }, { 119, 4 }, { 116, -14 }, { 111, -34 },
  { 104, -52 }, { 94, -66 }, { 80, -73 }, { 66, -71 }, { 50, -64 },
  { 32, -60 }, { 14, -58 }, { 6, -54 }, { 3, -30 }, { 4, -8 }, { 12, -3 },
  { 30, 0 }, { 48, 6 }, { 60, 18 }, { 65, 34 }, { 60, 52 }, { 48, 66 },
  { 36, 76 }, { 34, 92 }, { 36, 104 },
};

static const double obturator_outline[][2] = {
  { 30, -18 }, { 46, -11 }, { 62, -15 }, { 71, -27 }, { 68, -42 },
  { 55, -50 }, { 38, -48 }, { 28, -33 },
};

/* Sacrum, both halves (u signed), and its anterior foramina. */
static const double sacrum_outline[][2] = {
  { -50, 108 }, { -30, 114 }, { 0, 116 }, { 30, 114 }, { 50, 108 },
  { 44, 92 }, { 38, 74 }, { 31, 55 }, { 22, 36 }, { 12, 20 }, { 0, 12 },
  { -12, 20 }, { -22, 36 }, { -31, 55 }, { -38, 74 }, { -44, 92 },
};

static const double sacral_foramina[][3] = {
  { 17, 94, 5.0 }, { 15, 76, 4.5 }, { 13, 58, 4.0 }, { 11, 42, 3.3 },
};

/* The lowest lumbar vertebral body: half width, bottom and top. */
#define L5_HALF_WIDTH 26.0
#define L5_BOTTOM 122.0
#define L5_TOP 150.0

/* Where the teardrop sits in the template when it is not placed. */
#define TEMPLATE_TEARDROP_U 62.0
#define TEMPLATE_TEARDROP_V (-18.0)

typedef struct {
  HlVec2 m;       /* midline point */
  HlVec2 up;      /* along the midline, superior */
  HlVec2 across;  /* perpendicular, towards the patient's left */
} MidFrame;

typedef struct {
  bool ok;
  HlVec2 hip;
  HlVec2 base;    /* the midline at the hip centre's level */
  double ls;      /* +1 when lateral is along `across` */
  double ku;      /* template scale across and below the hip centre */
  double kv_up;   /* template scale above it */
  double shift;   /* lateral shift of the wing, mm */
} Hemi;

typedef struct {
  bool ok;
  MidFrame f;
  Hemi side[2];   /* [0] operated, [1] other */
} Pelvis;

static HlVec2
hemi_point (const Hemi *h, const MidFrame *f, double u, double v)
{
  double w = clampd ((v - WING_WARP_START_V) / WING_WARP_SPAN_V, 0.0,
                     WING_STRETCH_MAX);
  double uu = u * h->ku + h->shift * w;
  double vv = v * (v > 0.0 ? h->kv_up : h->ku);
  return vcomb (h->base, f->across, h->ls * uu, f->up, vv);
}

static void
hemi_uv (const Hemi *h, const MidFrame *f, HlVec2 p, double *u, double *v)
{
  HlVec2 d = vsub (p, h->base);
  *u = h->ls * vdot (d, f->across) / h->ku;
  *v = vdot (d, f->up) / h->ku;
}

static HlVec2
mirror_point (const MidFrame *f, HlVec2 p)
{
  double d = vdot (vsub (p, f->m), f->across);
  return vsub (p, vmul (f->across, 2.0 * d));
}

static MidFrame
mid_frame (const HlLandmarks *lm)
{
  MidFrame f = { lm->p[HL_LM_MIDLINE], v2 (0, 1), v2 (1, 0) };
  if (hl_landmarks_has (lm, HL_LM_TEARDROP)
      && hl_landmarks_has (lm, HL_LM_TEARDROP_OTHER))
    {
      HlVec2 d = vsub (lm->p[HL_LM_TEARDROP_OTHER], lm->p[HL_LM_TEARDROP]);
      if (d.x < 0.0)
        d = vmul (d, -1.0);
      if (vlen (d) >= TEARDROP_MIN_SEPARATION_MM && vfinite (d))
        {
          f.across = vunit (d, v2 (1, 0));
          f.up = v2 (-f.across.y, f.across.x);
        }
    }
  return f;
}

/* Plan-frame x direction of the operated side's lateral: -1 for a right
 * hip (the patient's right is -x). */
static double
side_lateral_sign (HlSide side)
{
  return side == HL_SIDE_LEFT ? 1.0 : -1.0;
}

static HlVec2
other_hip_centre (const HlLandmarks *lm, const MidFrame *f)
{
  if (hl_landmarks_has (lm, HL_LM_HIP_CENTRE_OTHER))
    return lm->p[HL_LM_HIP_CENTRE_OTHER];
  return mirror_point (f, lm->p[HL_LM_HIP_CENTRE]);
}

static void
hemi_init (Hemi *h, const MidFrame *f, HlVec2 hip, double default_ls)
{
  h->hip = hip;
  h->base = vadd (f->m, vmul (f->up, vdot (vsub (hip, f->m), f->up)));
  double lat = vdot (vsub (hip, f->m), f->across);
  h->ls = fabs (lat) > 1e-6 ? (lat > 0 ? 1.0 : -1.0) : default_ls;
  h->ku = clampd (fabs (lat) / TEMPLATE_HIP_U, PELVIS_SCALE_MIN,
                  PELVIS_SCALE_MAX);
  h->kv_up = h->ku;
  h->shift = 0.0;
  h->ok = vfinite (hip);
}

static Pelvis
pelvis_build (const HlLandmarks *lm, HlSide side)
{
  Pelvis p = { 0 };
  if (!hl_landmarks_has (lm, HL_LM_MIDLINE)
      || !hl_landmarks_has (lm, HL_LM_HIP_CENTRE)
      || !vfinite (lm->p[HL_LM_MIDLINE]) || !vfinite (lm->p[HL_LM_HIP_CENTRE]))
    return p;
  p.f = mid_frame (lm);
  double ls = side_lateral_sign (side);
  hemi_init (&p.side[0], &p.f, lm->p[HL_LM_HIP_CENTRE], ls);
  hemi_init (&p.side[1], &p.f, other_hip_centre (lm, &p.f), -ls);

  if (hl_landmarks_has (lm, HL_LM_ABDUCTOR_ORIGIN)
      && vfinite (lm->p[HL_LM_ABDUCTOR_ORIGIN]))
    {
      Hemi *h = &p.side[0];
      HlVec2 d = vsub (lm->p[HL_LM_ABDUCTOR_ORIGIN], h->base);
      double uo = h->ls * vdot (d, p.f.across), vo = vdot (d, p.f.up);
      double stretch = clampd (vo / (TEMPLATE_ORIGIN_V * h->ku),
                               WING_STRETCH_MIN, WING_STRETCH_MAX);
      h->kv_up = h->ku * stretch;
      h->shift = clampd (uo - TEMPLATE_ORIGIN_U * h->ku, -WING_SHIFT_MAX_MM,
                         WING_SHIFT_MAX_MM);
      /* The other wing follows, so the pelvis stays symmetric. */
      Hemi *o = &p.side[1];
      o->kv_up = o->ku * stretch;
      o->shift = h->shift * o->ku / h->ku;
    }
  p.ok = p.side[0].ok && p.side[1].ok;
  return p;
}

static void
hemi_poly (const Hemi *h, const MidFrame *f, const double (*uv)[2], int n,
           Poly *out)
{
  out->n = 0;
  for (int i = 0; i < n; i++)
    poly_add (out, hemi_point (h, f, uv[i][0], uv[i][1]));
}

/* The sacrum and L5 sit on the midline between both hemipelves. */
static Hemi
sacrum_frame (const Pelvis *p)
{
  Hemi s = p->side[0];
  s.base = vmul (vadd (p->side[0].base, p->side[1].base), 0.5);
  s.ku = 0.5 * (p->side[0].ku + p->side[1].ku);
  s.kv_up = 0.5 * (p->side[0].kv_up + p->side[1].kv_up);
  s.shift = 0.0;
  s.ls = 1.0;
  return s;
}

/* The acetabular roof, medial wall and teardrop of one side. */
static void
acetabulum_poly (const Hemi *h, const MidFrame *f, const HlLandmarks *lm,
                 HlLandmarkId teardrop, Poly *out)
{
  double tu = TEMPLATE_TEARDROP_U, tv = TEMPLATE_TEARDROP_V;
  if (hl_landmarks_has (lm, teardrop) && vfinite (lm->p[teardrop]))
    hemi_uv (h, f, lm->p[teardrop], &tu, &tv);

  out->n = 0;
  double r = ACETABULUM_RADIUS_MM;
  for (double a = 30.0; a <= 170.0; a += 10.0)
    poly_add (out, hemi_point (h, f, TEMPLATE_HIP_U + r * cos (a * DEG),
                               r * sin (a * DEG)));
  poly_add (out, hemi_point (h, f, tu + 2.0, tv + 12.0));
  poly_add (out, hemi_point (h, f, tu + 1.5, tv + 4.0));
  poly_add (out, hemi_point (h, f, tu, tv));
  poly_add (out, hemi_point (h, f, tu - 4.0, tv + 4.0));
  poly_add (out, hemi_point (h, f, tu - 6.0, tv + 14.0));
  poly_add (out, hemi_point (h, f, tu - 5.0, tv + 26.0));
}

/* ---- A femur -------------------------------------------------------------- */

typedef struct {
  bool ok;
  HlVec2 head;
  double head_r;
  Poly outline;      /* open: the distal end is not a bone edge */
} Femur;

typedef struct {
  HlVec2 hip, ins, lt, sp, sd;
  bool has_ins, has_lt, has_sp, has_sd;
  double ls;         /* plan-frame x direction of lateral */
  double neck_shaft_deg;
} FemurIn;

static Femur
femur_build (const FemurIn *in)
{
  Femur fm = { 0 };
  if (!vfinite (in->hip))
    return fm;
  const double ls = in->ls;
  const double ws = SHAFT_HALF_WIDTH_MM;
  const double rh = HEAD_RADIUS_MM;
  const double wn = NECK_HALF_WIDTH_RATIO * rh;
  HlVec2 h = in->hip;

  HlVec2 a = v2 (ls * sin (SHAFT_TILT_DEFAULT_DEG * DEG),
                 cos (SHAFT_TILT_DEFAULT_DEG * DEG));
  if (in->has_sp && in->has_sd
      && vlen (vsub (in->sp, in->sd)) >= SHAFT_POINTS_MIN_SEPARATION_MM)
    {
      a = vunit (vsub (in->sp, in->sd), a);
      if (a.y < 0.0)
        a = vmul (a, -1.0);
    }
  HlVec2 n = v2 (ls * a.y, -ls * a.x);   /* lateral, perpendicular to a */

  HlVec2 axis_pt;
  if (in->has_sp)
    axis_pt = in->sp;
  else if (in->has_sd)
    axis_pt = in->sd;
  else
    axis_pt = vadd (h, vmul (n, FEMORAL_OFFSET_DEFAULT_MM));

  double offset = fmax (-vdot (vsub (h, axis_pt), n),
                        FEMORAL_OFFSET_DRAW_MIN_MM);
  HlVec2 foot = vadd (h, vmul (n, offset));
  double nsa = clampd (in->neck_shaft_deg, HL_NECK_SHAFT_MIN_DEG + 1.0,
                       HL_NECK_SHAFT_MAX_DEG - 1.0);
  HlVec2 q = vsub (foot, vmul (a, offset / tan (M_PI - nsa * DEG)));
  HlVec2 e = vunit (vsub (h, q), v2 (-ls, 0));
  HlVec2 p = v2 (-e.y, e.x);
  if (vdot (p, a) < 0.0)
    p = vmul (p, -1.0);

#define AX(t, s) vcomb (q, a, (t), n, (s))
  HlVec2 ins = in->has_ins ? in->ins : AX (offset - 8.0, ws + 6.0);
  HlVec2 lt = in->has_lt ? in->lt : AX (-14.0, -(ws + 4.0));
  double t_ins = vdot (vsub (ins, q), a);
  double t_lt = vdot (vsub (lt, q), a);
  double t_end = -SHAFT_LENGTH_MIN_MM;
  if (in->has_sd)
    t_end = fmin (t_end, vdot (vsub (in->sd, q), a) - SHAFT_BEYOND_DISTAL_MM);
  t_end = fmin (t_end, t_lt - 60.0);
  double t_flare = fmin (t_ins - 24.0, t_lt + 10.0);

  Poly *o = &fm.outline;
  o->n = 0;
  poly_add (o, AX (t_end, ws));
  poly_add (o, AX (t_end, ws));
  poly_add (o, AX (0.5 * (t_end + t_flare), ws));
  poly_add (o, AX (t_flare, ws));
  poly_add (o, vsub (ins, vmul (a, 9.0)));
  poly_add (o, ins);
  poly_add (o, vcomb (ins, a, 6.0, n, -7.0));
  poly_add (o, vcomb (ins, a, 3.0, n, -16.0));

  double along = sqrt (rh * rh - wn * wn);
  double neck_len = vlen (vsub (h, q));
  HlVec2 fossa = vcomb (q, e, 0.40 * neck_len, p, wn);
  poly_add (o, fossa);

  HlVec2 js = vcomb (h, e, -along, p, wn);
  HlVec2 ji = vcomb (h, e, -along, p, -wn);
  double as = atan2 (js.y - h.y, js.x - h.x);
  double ai = atan2 (ji.y - h.y, ji.x - h.x);
  double ae = atan2 (e.y, e.x);
  double toward = remainder (ae - as, 2.0 * M_PI);
  double span = toward > 0 ? fmod (ai - as + 4.0 * M_PI, 2.0 * M_PI)
                           : -fmod (as - ai + 4.0 * M_PI, 2.0 * M_PI);
  const int head_steps = 24;
  for (int i = 0; i <= head_steps; i++)
    {
      double t = as + span * i / head_steps;
      poly_add (o, v2 (h.x + rh * cos (t), h.y + rh * sin (t)));
    }

  poly_add (o, vcomb (q, e, 0.45 * neck_len, p, -wn));
  poly_add (o, AX (fmin (t_lt + 13.0, 0.0), -(ws + 5.0)));
  poly_add (o, vadd (lt, vmul (a, 6.0)));
  poly_add (o, lt);
  poly_add (o, AX (t_lt - 8.0, -(ws + 0.5)));
  poly_add (o, AX (t_lt - 30.0, -ws));
  poly_add (o, AX (0.5 * (t_end + t_lt - 30.0), -ws));
  poly_add (o, AX (t_end, -ws));
  poly_add (o, AX (t_end, -ws));
#undef AX

  fm.head = h;
  fm.head_r = rh;
  fm.ok = true;
  return fm;
}

static FemurIn
femur_in_operated (const HlLandmarks *lm, HlSide side, double nsa)
{
  FemurIn in = { 0 };
  in.hip = lm->p[HL_LM_HIP_CENTRE];
  in.ins = lm->p[HL_LM_ABDUCTOR_INSERTION];
  in.lt = lm->p[HL_LM_LESSER_TROCHANTER];
  in.sp = lm->p[HL_LM_SHAFT_PROXIMAL];
  in.sd = lm->p[HL_LM_SHAFT_DISTAL];
  in.has_ins = hl_landmarks_has (lm, HL_LM_ABDUCTOR_INSERTION) && vfinite (in.ins);
  in.has_lt = hl_landmarks_has (lm, HL_LM_LESSER_TROCHANTER) && vfinite (in.lt);
  in.has_sp = hl_landmarks_has (lm, HL_LM_SHAFT_PROXIMAL) && vfinite (in.sp);
  in.has_sd = hl_landmarks_has (lm, HL_LM_SHAFT_DISTAL) && vfinite (in.sd);
  in.ls = side_lateral_sign (side);
  in.neck_shaft_deg = nsa;
  return in;
}

/* The other femur: its own landmarks where placed, else the operated side's
 * mirrored about the midline and moved with the other hip centre. */
static bool
femur_in_other (const HlLandmarks *lm, HlSide side, FemurIn *in)
{
  static const HlLandmarkId pairs[][2] = {
    { HL_LM_LESSER_TROCHANTER, HL_LM_LESSER_TROCHANTER_OTHER },
    { HL_LM_SHAFT_PROXIMAL, HL_LM_SHAFT_PROXIMAL_OTHER },
    { HL_LM_SHAFT_DISTAL, HL_LM_SHAFT_DISTAL_OTHER },
  };
  bool has_mid = hl_landmarks_has (lm, HL_LM_MIDLINE);
  bool has_hip = hl_landmarks_has (lm, HL_LM_HIP_CENTRE);
  bool has_other = hl_landmarks_has (lm, HL_LM_HIP_CENTRE_OTHER);
  memset (in, 0, sizeof *in);
  in->ls = -side_lateral_sign (side);
  in->neck_shaft_deg = HL_NECK_SHAFT_ANGLE_DEFAULT;
  if (!has_other && !(has_mid && has_hip))
    return false;

  bool can_mirror = has_mid && has_hip;
  MidFrame f = mid_frame (lm);
  HlVec2 mirrored_hip = can_mirror ? mirror_point (&f, lm->p[HL_LM_HIP_CENTRE])
                                   : v2 (0, 0);
  in->hip = has_other ? lm->p[HL_LM_HIP_CENTRE_OTHER] : mirrored_hip;
  HlVec2 shift = vsub (in->hip, mirrored_hip);

  HlVec2 *dst[] = { &in->lt, &in->sp, &in->sd };
  bool *has[] = { &in->has_lt, &in->has_sp, &in->has_sd };
  for (size_t i = 0; i < 3; i++)
    {
      if (hl_landmarks_has (lm, pairs[i][1]))
        {
          *dst[i] = lm->p[pairs[i][1]];
          *has[i] = true;
        }
      else if (can_mirror && hl_landmarks_has (lm, pairs[i][0]))
        {
          *dst[i] = vadd (mirror_point (&f, lm->p[pairs[i][0]]), shift);
          *has[i] = true;
        }
    }
  if (can_mirror && hl_landmarks_has (lm, HL_LM_ABDUCTOR_INSERTION))
    {
      in->ins = vadd (mirror_point (&f, lm->p[HL_LM_ABDUCTOR_INSERTION]), shift);
      in->has_ins = true;
    }
  return vfinite (in->hip);
}

/* ---- Scenes: built by the core (hl-scene.c) ------------------------------ */

/* Every shape of a scene, in plan coordinates. */
typedef struct {
  Pelvis pelvis;
  Poly hemi[2];
  Poly obturator[2];
  Poly acetabulum[2];
  Poly sacrum;
  Hemi sacrum_frame;
  Femur native_femur;   /* operated, native */
  Femur shown_femur;    /* operated, the option's (= native without one) */
  Femur other_femur;
} Shapes;

static void
shapes_build (const HlScene *scene, Shapes *sh)
{
  memset (sh, 0, sizeof *sh);
  if (scene->plan == NULL)
    return;
  const HlLandmarks *lm = &scene->native;
  HlSide side = scene->plan->side;

  sh->pelvis = pelvis_build (lm, side);
  if (sh->pelvis.ok)
    {
      static const HlLandmarkId teardrops[2] = { HL_LM_TEARDROP, HL_LM_TEARDROP_OTHER };
      for (int s = 0; s < 2; s++)
        {
          const Hemi *h = &sh->pelvis.side[s];
          hemi_poly (h, &sh->pelvis.f, hemipelvis_outline,
                     (int) N_ELEMENTS (hemipelvis_outline), &sh->hemi[s]);
          hemi_poly (h, &sh->pelvis.f, obturator_outline,
                     (int) N_ELEMENTS (obturator_outline), &sh->obturator[s]);
          acetabulum_poly (h, &sh->pelvis.f, lm, teardrops[s], &sh->acetabulum[s]);
        }
      sh->sacrum_frame = sacrum_frame (&sh->pelvis);
      hemi_poly (&sh->sacrum_frame, &sh->pelvis.f, sacrum_outline,
                 (int) N_ELEMENTS (sacrum_outline), &sh->sacrum);
    }

  if (hl_landmarks_has (lm, HL_LM_HIP_CENTRE))
    {
      FemurIn in = femur_in_operated (lm, side, HL_NECK_SHAFT_ANGLE_DEFAULT);
      sh->native_femur = femur_build (&in);
      sh->shown_femur = sh->native_femur;
      if (scene->has_option && hl_landmarks_has (&scene->shown, HL_LM_HIP_CENTRE))
        {
          FemurIn oin = femur_in_operated (&scene->shown, side,
                                           HL_NECK_SHAFT_ANGLE_DEFAULT);
          sh->shown_femur = femur_build (&oin);
        }
    }
  FemurIn other;
  if (femur_in_other (lm, side, &other))
    sh->other_femur = femur_build (&other);
}

bool
hl_scene_bounds (const HlScene *scene, double *x0, double *y0, double *x1,
                 double *y1)
{
  double b[4] = { INFINITY, INFINITY, -INFINITY, -INFINITY };
  Shapes sh;
  shapes_build (scene, &sh);
  for (int s = 0; s < 2; s++)
    poly_bounds (&sh.hemi[s], b);
  poly_bounds (&sh.native_femur.outline, b);
  poly_bounds (&sh.shown_femur.outline, b);
  poly_bounds (&sh.other_femur.outline, b);

  Poly pts = { .n = 0 };
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (hl_landmarks_has (&scene->native, (HlLandmarkId) i))
        poly_add (&pts, scene->native.p[i]);
      if (hl_landmarks_has (&scene->shown, (HlLandmarkId) i))
        poly_add (&pts, scene->shown.p[i]);
    }
  if (scene->solved)
    for (int i = 0; i < scene->forces.n; i++)
      {
        const HlForce *f = &scene->forces.f[i];
        HlVec2 d = vmul (vunit (f->vector, v2 (0, 0)),
                         f->bw * HL_RENDER_FORCE_MM_PER_BW);
        poly_add (&pts, f->point);
        poly_add (&pts, vadd (f->point, d));
        poly_add (&pts, vsub (f->point, d));
      }
  poly_bounds (&pts, b);

  bool any = isfinite (b[0]) && isfinite (b[2]);
  if (!any)
    {
      b[0] = -200.0;
      b[1] = -220.0;
      b[2] = 200.0;
      b[3] = 160.0;
    }
  *x0 = b[0];
  *y0 = b[1];
  *x1 = b[2];
  *y1 = b[3];
  return any;
}

void
hl_render_fit_view (const HlScene *scene, double width, double height,
                    double margin, HlView *view)
{
  double x0, y0, x1, y1;
  hl_scene_bounds (scene, &x0, &y0, &x1, &y1);
  hl_view_fit_box (view, x0, y0, x1, y1, width, height, margin);
}

/* Room kept clear of the bones for what is drawn around them. */
#define FRAME_TOP_PX (62.0 * px_size)
#define FRAME_BOTTOM_PX (52.0 * px_size)
#define CAUTION_GLYPH_EM 0.55
#define CAUTION_FONT_SCALE 0.85
#define CAUTION_LINE_EM 1.15
#define CAUTION_PAD_PX (10.0 * px_size)
#define LEGEND_RESERVE_EM 17.0
#define LEGEND_ASPECT_MIN 1.45
/* The share of its scale a drawing keeps when it gives the legend its
 * column. */
#define LEGEND_KEEP_SCALE 0.97
#define FRAME_FULL_HEIGHT_PX (520.0 * px_size)
#define FRAME_SMALL_RATIO 0.6
#define WIDE_ASPECT 2.0

void
hl_render_fit_view_framed (const HlScene *scene, const HlRenderStyle *style,
                           double width, double height, double margin,
                           HlView *view)
{
  px_size = style->size > 0.0 && isfinite (style->size) ? style->size : 1.0;
  /* A small rectangle lets the frame overlap the picture a little more. */
  double k = height < FRAME_FULL_HEIGHT_PX ? FRAME_SMALL_RATIO : 1.0;
  double top = style->show_frame ? k * FRAME_TOP_PX : 0.0;
  double bottom = style->show_frame ? k * FRAME_BOTTOM_PX : 0.0;
  if (style->show_caution)
    {
      /* The full caution wraps to a few lines; an average glyph is about
       * half the font size wide. */
      double chars_per_line = fmax ((width - 2.0 * BOX_MARGIN_PX)
                                    / (CAUTION_GLYPH_EM * CAUTION_FONT_SCALE * style->font_px), 1.0);
      double n = ceil (strlen (hl_caution_text ()) / chars_per_line);
      bottom += n * CAUTION_LINE_EM * style->font_px + CAUTION_PAD_PX;
    }
  double right = 0.0;
  double legend_w = LEGEND_RESERVE_EM * style->font_px;
  bool wide_for_legend = width - legend_w > LEGEND_ASPECT_MIN * (height - top - bottom);
  /* A wide, low rectangle (a window on a 1366 x 768 screen: the default
   * 1280 x 768 window gives the schematic 810 x 371 px, 2.18 to 1) has room
   * for the markers and the bars in its corners beside the bones: keep only
   * the title's line clear, so that the pelvis fills the height. */
  if (style->show_frame && width > WIDE_ASPECT * height)
    {
      top = 1.6 * style->font_px;
      bottom = style->show_caution ? bottom - k * FRAME_BOTTOM_PX : 0.0;
    }
  if (height - top - bottom < 0.5 * height)
    top = bottom = 0.0;
  /* The legend's column is kept clear where the rectangle is wide enough,
   * and also where the bones, held by the height, keep their scale beside
   * it (a small figure): the legend then stands beside the drawing rather
   * than over it. */
  if (style->show_legend && legend_w < width)
    {
      HlView full, beside;
      hl_render_fit_view (scene, width, height - top - bottom, margin, &full);
      hl_render_fit_view (scene, width - legend_w, height - top - bottom, margin, &beside);
      if (wide_for_legend || beside.scale >= LEGEND_KEEP_SCALE * full.scale)
        right = legend_w;
    }
  hl_render_fit_view (scene, width - right, height - top - bottom, margin, view);
  view->ty += top;
}

/* ---- Text ----------------------------------------------------------------- */

static void
font (cairo_t *cr, const HlRenderStyle *style, double scale, bool bold)
{
  cairo_select_font_face (cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                          bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
  cairo_set_font_size (cr, style->font_px * scale);
}

/* A pale box behind text of the frame when the drawing lies over a
 * radiograph (style->over_image), so that dark text stays readable on a
 * dark image; nothing otherwise. */
#define TEXT_BACKING_ALPHA 0.85
static void
text_backing (cairo_t *cr, const HlRenderStyle *style, double x, double y, double w,
              double h)
{
  if (!style->over_image && !style->text_backing)
    return;
  cairo_new_path (cr);
  cairo_rectangle (cr, x, y, w, h);
  set_rgba (cr, style->bg, TEXT_BACKING_ALPHA);
  cairo_fill (cr);
}

/* A label on a rounded pale pill, centred on (cx, cy). */
static void
label_pill (cairo_t *cr, const HlRenderStyle *style, const char *text,
            double cx, double cy, HlRgba color)
{
  cairo_text_extents_t te;
  cairo_font_extents_t fe;
  cairo_text_extents (cr, text, &te);
  cairo_font_extents (cr, &fe);
  double w = te.x_advance + 2.0 * LABEL_PAD_PX;
  double h = fe.ascent + fe.descent + LABEL_PAD_PX;
  double x = cx - 0.5 * w, y = cy - 0.5 * h, r = 0.5 * h;

  cairo_new_sub_path (cr);
  cairo_arc (cr, x + w - r, y + r, r, -M_PI / 2, M_PI / 2);
  cairo_arc (cr, x + r, y + r, r, M_PI / 2, 3 * M_PI / 2);
  cairo_close_path (cr);
  set_rgba (cr, style->bg, 0.85);
  cairo_fill (cr);

  set_rgba (cr, color, 1.0);
  cairo_move_to (cr, x + LABEL_PAD_PX, y + 0.5 * LABEL_PAD_PX + fe.ascent);
  cairo_show_text (cr, text);
}

static void
label_size (cairo_t *cr, const char *text, double *w, double *h)
{
  cairo_text_extents_t te;
  cairo_font_extents_t fe;
  cairo_text_extents (cr, text, &te);
  cairo_font_extents (cr, &fe);
  *w = te.x_advance + 2.0 * LABEL_PAD_PX;
  *h = fe.ascent + fe.descent + LABEL_PAD_PX;
}

/* Labels and handles already on the picture, so that a new label can
 * step aside instead of covering them. */
#define PLACER_MAX 64

typedef struct {
  double x, y, w, h;
} Rect;

typedef struct {
  Rect r[PLACER_MAX];
  int n;
  double width, height;   /* the drawing: a label outside it counts as covering */
} Placer;

static void
placer_add (Placer *pl, double x, double y, double w, double h)
{
  if (pl->n < PLACER_MAX)
    pl->r[pl->n++] = (Rect) { x, y, w, h };
}

static double
placer_overlap (const Placer *pl, double x, double y, double w, double h)
{
  double area = 0.0;
  for (int i = 0; i < pl->n; i++)
    {
      const Rect *r = &pl->r[i];
      double ox = fmin (x + w, r->x + r->w) - fmax (x, r->x);
      double oy = fmin (y + h, r->y + r->h) - fmax (y, r->y);
      if (ox > 0.0 && oy > 0.0)
        area += ox * oy;
    }
  if (pl->width > 0.0 && pl->height > 0.0)
    {
      double ix = fmin (x + w, pl->width) - fmax (x, 0.0);
      double iy = fmin (y + h, pl->height) - fmax (y, 0.0);
      double inside = ix > 0.0 && iy > 0.0 ? ix * iy : 0.0;
      area += 4.0 * (w * h - inside);
    }
  return area;
}

/* A label centred on (cx, cy), or moved by whole lines and half widths to
 * the nearest place where it covers nothing already placed and stays in
 * the drawing; a label moved far from its place is led back to it by a
 * thin line. */
#define LABEL_RINGS 10
#define LABEL_LEADER_LINES 1.5

/* Where a label goes: (cx, cy) where it belongs, (bx, by) its centre. */
typedef struct {
  double cx, cy, bx, by, w, h;
} LabelSpot;

/* Chooses the label's place and takes it in the placer; draws nothing. */
static LabelSpot
label_choose (cairo_t *cr, const HlRenderStyle *style, Placer *pl,
              const char *text, double cx, double cy)
{
  static const double dirs[][2] = {
    { 0, 1 }, { 0, -1 }, { 0.6, 0 }, { -0.6, 0 }, { 0.6, 1 }, { -0.6, 1 },
    { 0.6, -1 }, { -0.6, -1 }, { 1.2, 0 }, { -1.2, 0 }, { 1.2, 1 }, { -1.2, -1 },
    { 1.2, -1 }, { -1.2, 1 }, { 0, 0.5 }, { 0, -0.5 }, { 0.6, 0.5 }, { -0.6, 0.5 },
    { 0.6, -0.5 }, { -0.6, -0.5 },
  };
  double w, h;
  label_size (cr, text, &w, &h);
  double bx = cx, by = cy;
  double least = placer_overlap (pl, cx - 0.5 * w, cy - 0.5 * h, w, h);
  for (int ring = 1; ring <= LABEL_RINGS && least > 0.0; ring++)
    for (size_t k = 0; k < N_ELEMENTS (dirs) && least > 0.0; k++)
      {
        double x = cx + ring * dirs[k][0] * w, y = cy + ring * dirs[k][1] * (h + 2.0);
        double area = placer_overlap (pl, x - 0.5 * w, y - 0.5 * h, w, h);
        if (area < least)
          {
            least = area;
            bx = x;
            by = y;
          }
      }
  /* Still covering something: the free place nearest to where the label
   * belongs, anywhere in the drawing (led back by a line). */
  if (least > 0.0 && pl->width > w && pl->height > h)
    {
      double best_d = INFINITY;
      for (double y = 0.5 * h; y <= pl->height - 0.5 * h; y += 0.25 * h)
        for (double x = 0.5 * w; x <= pl->width - 0.5 * w; x += 0.125 * w)
          {
            double d = hypot (x - cx, y - cy);
            if (d < best_d && placer_overlap (pl, x - 0.5 * w, y - 0.5 * h, w, h) <= 0.0)
              {
                best_d = d;
                bx = x;
                by = y;
              }
          }
    }
  placer_add (pl, bx - 0.5 * w, by - 0.5 * h, w, h);
  layout_add (style, HL_BOX_LABEL, bx - 0.5 * w, by - 0.5 * h, w, h);
  return (LabelSpot) { cx, cy, bx, by, w, h };
}

static void
label_draw (cairo_t *cr, const HlRenderStyle *style, const LabelSpot *at,
            const char *text, HlRgba color)
{
  double cx = at->cx, cy = at->cy, bx = at->bx, by = at->by, w = at->w, h = at->h;

  if (hypot (bx - cx, by - cy) > LABEL_LEADER_LINES * (h + 2.0))
    {
      /* From the label's nearest edge back to where it belongs. */
      double ex = fmin (fmax (cx, bx - 0.5 * w), bx + 0.5 * w);
      double ey = fmin (fmax (cy, by - 0.5 * h), by + 0.5 * h);
      set_rgba (cr, color, 0.6);
      cairo_set_line_width (cr, 0.8 * px_size);
      cairo_set_dash (cr, NULL, 0, 0);
      cairo_new_path (cr);
      cairo_move_to (cr, ex, ey);
      cairo_line_to (cr, cx, cy);
      cairo_stroke (cr);
    }
  label_pill (cr, style, text, bx, by, color);
}

static void
label_place (cairo_t *cr, const HlRenderStyle *style, Placer *pl,
             const char *text, double cx, double cy, HlRgba color)
{
  LabelSpot at = label_choose (cr, style, pl, text, cx, cy);

  label_draw (cr, style, &at, text, color);
}

/* Splits text into at most WRAP_LINES_MAX lines of at most max_w px. */
typedef struct {
  char line[WRAP_LINES_MAX][HL_ERROR_MESSAGE_MAX];
  int n;
} Wrapped;

static void
wrap_text (cairo_t *cr, const char *text, double max_w, Wrapped *out)
{
  out->n = 0;
  char cur[HL_ERROR_MESSAGE_MAX] = "";
  const char *p = text;
  while (*p != '\0' && out->n < WRAP_LINES_MAX)
    {
      while (*p == ' ')
        p++;
      const char *end = p;
      while (*end != '\0' && *end != ' ')
        end++;
      if (end == p)
        break;
      char word[HL_ERROR_MESSAGE_MAX];
      size_t wl = (size_t) (end - p);
      if (wl >= sizeof word)
        wl = sizeof word - 1;
      memcpy (word, p, wl);
      word[wl] = '\0';
      p = end;

      char trial[2 * HL_ERROR_MESSAGE_MAX + 2];
      snprintf (trial, sizeof trial, "%s%s%s", cur, cur[0] ? " " : "", word);
      size_t tl = strlen (trial);
      cairo_text_extents_t te;
      cairo_text_extents (cr, trial, &te);
      if (te.x_advance > max_w && cur[0] != '\0')
        {
          snprintf (out->line[out->n++], HL_ERROR_MESSAGE_MAX, "%s", cur);
          snprintf (cur, sizeof cur, "%s", word);
        }
      else if (tl < sizeof cur)
        memcpy (cur, trial, tl + 1);
    }
  if (cur[0] != '\0' && out->n < WRAP_LINES_MAX)
    snprintf (out->line[out->n++], HL_ERROR_MESSAGE_MAX, "%s", cur);
}

/* ---- Drawing pieces --------------------------------------------------------- */

static void
stroke_poly (cairo_t *cr, const HlView *view, const Poly *poly, bool closed)
{
  cairo_new_path (cr);
  path_spline (cr, view, poly, closed);
  cairo_stroke (cr);
}

static void
draw_pelvis (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
             const Shapes *sh)
{
  if (!sh->pelvis.ok)
    return;
  const Hemi *sf = &sh->sacrum_frame;
  const MidFrame *f = &sh->pelvis.f;

  /* L5 body: a faint hint of the spine above the sacrum. */
  Poly l5 = { .n = 0 };
  const double l5_pts[][2] = {
    { -L5_HALF_WIDTH, L5_BOTTOM }, { -L5_HALF_WIDTH, L5_BOTTOM },
    { L5_HALF_WIDTH, L5_BOTTOM }, { L5_HALF_WIDTH, L5_BOTTOM },
    { L5_HALF_WIDTH + 2.0, 0.5 * (L5_BOTTOM + L5_TOP) },
    { L5_HALF_WIDTH, L5_TOP }, { L5_HALF_WIDTH, L5_TOP },
    { -L5_HALF_WIDTH, L5_TOP }, { -L5_HALF_WIDTH, L5_TOP },
    { -L5_HALF_WIDTH - 2.0, 0.5 * (L5_BOTTOM + L5_TOP) },
  };
  hemi_poly (sf, f, l5_pts, (int) N_ELEMENTS (l5_pts), &l5);

  /* Opaque colours mixed with the background: the same look as
   * translucent ink, and much cheaper to paint. */
  HlRgba tone = mix (style->bg, style->fg, BONE_FILL_ALPHA);
  HlRgba line = mix (style->bg, style->fg, BONE_LINE_ALPHA);
  HlRgba faint = mix (style->bg, style->fg, BONE_LINE_ALPHA * 0.6);
  cairo_set_line_width (cr, BONE_LINE_PX);
  cairo_set_dash (cr, NULL, 0, 0);

  /* Over a radiograph the bones are outlines only: the image shows them. */
  double fill = style->over_image ? 0.0 : 1.0;
  cairo_new_path (cr);
  path_spline (cr, view, &l5, true);
  set_rgba (cr, tone, fill);
  cairo_fill_preserve (cr);
  set_rgba (cr, faint, 1.0);
  cairo_stroke (cr);

  cairo_new_path (cr);
  for (int s = 0; s < 2; s++)
    {
      path_spline (cr, view, &sh->hemi[s], true);
      path_spline (cr, view, &sh->obturator[s], true);
    }
  cairo_set_fill_rule (cr, CAIRO_FILL_RULE_EVEN_ODD);
  set_rgba (cr, tone, fill);
  cairo_fill_preserve (cr);
  cairo_set_fill_rule (cr, CAIRO_FILL_RULE_WINDING);
  cairo_path_t *hemis = cairo_copy_path (cr);

  cairo_new_path (cr);
  path_spline (cr, view, &sh->sacrum, true);
  cairo_fill_preserve (cr);
  cairo_append_path (cr, hemis);
  cairo_path_destroy (hemis);
  set_rgba (cr, line, 1.0);
  cairo_stroke (cr);

  cairo_new_path (cr);
  for (size_t i = 0; i < N_ELEMENTS (sacral_foramina); i++)
    for (int sgn = -1; sgn <= 1; sgn += 2)
      {
        HlVec2 c = hemi_point (sf, f, sgn * sacral_foramina[i][0],
                               sacral_foramina[i][1]);
        HlVec2 sc = hl_view_to_screen (view, c);
        double r = sacral_foramina[i][2] * sf->ku * view->scale;
        cairo_new_sub_path (cr);
        cairo_arc (cr, sc.x, sc.y, r, 0, 2 * M_PI);
      }
  set_rgba (cr, faint, 1.0);
  cairo_stroke (cr);
}

static void
draw_acetabula (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
                const Shapes *sh)
{
  if (!sh->pelvis.ok)
    return;
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_set_line_width (cr, BONE_LINE_PX * 1.3);
  set_rgba (cr, mix (style->bg, style->fg, BONE_LINE_ALPHA), 1.0);
  for (int s = 0; s < 2; s++)
    stroke_poly (cr, view, &sh->acetabulum[s], false);
}

static void
draw_femur (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
            const Femur *fm, bool ghost)
{
  if (!fm->ok)
    return;
  cairo_set_line_width (cr, BONE_LINE_PX);
  if (ghost)
    {
      static const double dash[] = { 5.0, 4.0 };
      cairo_set_dash (cr, dash, 2, 0);
      cairo_new_path (cr);
      path_spline (cr, view, &fm->outline, false);
      set_rgba (cr, style->fg, NATIVE_GHOST_ALPHA);
      cairo_stroke (cr);
      cairo_set_dash (cr, NULL, 0, 0);
      return;
    }
  /* Opaque, so the femoral head covers the acetabulum behind it; over a
   * radiograph an outline only. */
  if (!style->over_image)
    {
      cairo_new_path (cr);
      path_spline (cr, view, &fm->outline, true);
      set_rgba (cr, mix (style->bg, style->fg, BONE_FILL_ALPHA * 1.4), 1.0);
      cairo_fill (cr);
    }
  cairo_set_dash (cr, NULL, 0, 0);
  set_rgba (cr, mix (style->bg, style->fg, BONE_LINE_ALPHA), 1.0);
  stroke_poly (cr, view, &fm->outline, false);
}

/* An implant cup at the option's hip centre, rim 40 degrees to the
 * horizontal, opening inferolaterally. */
static void
draw_cup (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
          HlVec2 centre, double radius, double ls)
{
  HlVec2 s = hl_view_to_screen (view, centre);
  /* The rim, in screen coordinates (y down): rises towards lateral. */
  double rim = atan2 (-sin (CUP_INCLINATION_DEG * DEG),
                      ls * cos (CUP_INCLINATION_DEG * DEG));
  double r_out = (radius + CUP_WALL_MM) * view->scale;
  double r_in = radius * view->scale;
  HlRgba c = hl_palette_color (HL_ROLE_OPTION, style->dark);

  double a0 = rim, a1 = rim + M_PI;
  /* The dome is the superomedial half: with screen y down, cairo's positive
   * sweep reaches it from the lateral rim of a right hip. */
  cairo_new_path (cr);
  if (ls < 0)
    {
      cairo_arc (cr, s.x, s.y, r_out, a0, a1);
      cairo_arc_negative (cr, s.x, s.y, r_in, a1, a0);
    }
  else
    {
      cairo_arc_negative (cr, s.x, s.y, r_out, a0, a1 - 2 * M_PI);
      cairo_arc (cr, s.x, s.y, r_in, a1 - 2 * M_PI, a0);
    }
  cairo_close_path (cr);
  set_rgba (cr, c, 0.18);
  cairo_fill_preserve (cr);
  set_rgba (cr, c, 0.9);
  cairo_set_line_width (cr, 1.5 * px_size);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_stroke (cr);
}

static void
draw_line_mm (cairo_t *cr, const HlView *view, HlVec2 a, HlVec2 b)
{
  HlVec2 sa = hl_view_to_screen (view, a), sb = hl_view_to_screen (view, b);
  cairo_new_path (cr);
  cairo_move_to (cr, sa.x, sa.y);
  cairo_line_to (cr, sb.x, sb.y);
  cairo_stroke (cr);
}

/* A digest (FNV-1a, 64 bits) of what a layer draws. */
typedef struct {
  uint64_t h;
} Digest;

#define DIGEST_INIT { 0xcbf29ce484222325ULL }

static void
digest_bytes (Digest *d, const void *data, size_t n)
{
  const unsigned char *p = data;

  for (size_t i = 0; i < n; i++)
    {
      d->h ^= p[i];
      d->h *= 0x100000001b3ULL;
    }
}

static void
digest_double (Digest *d, double v)
{
  if (v == 0.0)
    v = 0.0;   /* -0 and +0 draw the same */
  digest_bytes (d, &v, sizeof v);
}

static void
digest_vec (Digest *d, HlVec2 v)
{
  digest_double (d, v.x);
  digest_double (d, v.y);
}

static void
digest_poly (Digest *d, const Poly *poly)
{
  digest_bytes (d, &poly->n, sizeof poly->n);
  for (int i = 0; i < poly->n; i++)
    digest_vec (d, poly->p[i]);
}

static void
digest_hemi (Digest *d, const Hemi *h)
{
  digest_bytes (d, &h->ok, sizeof h->ok);
  digest_vec (d, h->hip);
  digest_vec (d, h->base);
  digest_double (d, h->ls);
  digest_double (d, h->ku);
  digest_double (d, h->kv_up);
  digest_double (d, h->shift);
}

static void
digest_frame (Digest *d, const MidFrame *f)
{
  digest_vec (d, f->m);
  digest_vec (d, f->up);
  digest_vec (d, f->across);
}

/* The midline and its label; with `draw` false only the label's place is
 * taken (the base layer is a picture drawn earlier).  `key`, when not
 * NULL, takes in what is drawn. */
static void
draw_midline (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
              Placer *pl, const HlScene *scene, const Shapes *sh, double y_lo,
              double y_hi, bool draw, Digest *key)
{
  if (!hl_landmarks_has (&scene->native, HL_LM_MIDLINE))
    return;
  MidFrame f = sh->pelvis.ok ? sh->pelvis.f : mid_frame (&scene->native);
  double span_lo = y_lo - f.m.y, span_hi = y_hi - f.m.y;
  HlVec2 a = vadd (f.m, vmul (f.up, span_lo / fmax (f.up.y, 0.5)));
  HlVec2 b = vadd (f.m, vmul (f.up, span_hi / fmax (f.up.y, 0.5)));
  if (key != NULL)
    {
      digest_vec (key, a);
      digest_vec (key, b);
    }
  if (draw)
    {
      static const double dash[] = { 12.0, 4.0, 2.0, 4.0 };
      cairo_set_dash (cr, dash, 4, 0);
      cairo_set_line_width (cr, CONSTRUCTION_LINE_PX);
      set_rgba (cr, style->fg, MIDLINE_ALPHA);
      draw_line_mm (cr, view, a, b);
      cairo_set_dash (cr, NULL, 0, 0);
    }

  if (style->show_labels)
    {
      const char *text = _("Midline");
      HlVec2 s = hl_view_to_screen (view, a);
      font (cr, style, 0.9, false);
      LabelSpot at = label_choose (cr, style, pl, text, s.x, s.y - 10.0);
      if (key != NULL)
        {
          digest_bytes (key, text, strlen (text));
          digest_bytes (key, &at, sizeof at);
        }
      if (draw)
        label_draw (cr, style, &at, text, style->fg);
    }
}

static void
arrow_path (cairo_t *cr, HlVec2 tail, HlVec2 head, double width,
            const double *dash, int n_dash)
{
  HlVec2 d = vsub (head, tail);
  double len = vlen (d);
  if (!(len > 0.5))
    return;
  HlVec2 u = vmul (d, 1.0 / len);
  HlVec2 nrm = v2 (-u.y, u.x);
  double hl = fmin (fmax (ARROW_HEAD_MIN_PX, ARROW_HEAD_PER_WIDTH * width), len);
  double hw = 0.42 * hl;
  HlVec2 base = vsub (head, vmul (u, hl * 0.85));

  cairo_set_line_width (cr, width);
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_BUTT);
  cairo_set_dash (cr, dash, n_dash, 0);
  cairo_new_path (cr);
  cairo_move_to (cr, tail.x, tail.y);
  cairo_line_to (cr, base.x, base.y);
  cairo_stroke (cr);
  cairo_set_dash (cr, NULL, 0, 0);

  HlVec2 back = vsub (head, vmul (u, hl));
  cairo_new_path (cr);
  cairo_move_to (cr, head.x, head.y);
  cairo_line_to (cr, back.x + nrm.x * hw, back.y + nrm.y * hw);
  cairo_line_to (cr, base.x, base.y);
  cairo_line_to (cr, back.x - nrm.x * hw, back.y - nrm.y * hw);
  cairo_close_path (cr);
  cairo_fill (cr);
}

static HlPaletteRole
force_role (HlForceKind kind)
{
  switch (kind)
    {
    case HL_FORCE_WEIGHT:
      return HL_ROLE_WEIGHT;
    case HL_FORCE_ABDUCTOR:
      return HL_ROLE_ABDUCTOR;
    case HL_FORCE_JOINT:
      return HL_ROLE_JOINT;
    case HL_FORCE_CANE:
      return HL_ROLE_CANE;
    case HL_FORCE_LOAD_CONTRA:
    case HL_FORCE_LOAD_IPSI:
    case HL_FORCE_LOAD_MIDLINE:
    case HL_FORCE_N:
    default:
      break;
    }
  return HL_ROLE_LOAD;
}

/* Short names on the arrows; the legend gives the full ones. */
static const char *
force_short (HlForceKind kind)
{
  switch (kind)
    {
    case HL_FORCE_WEIGHT:
      return _("Weight");
    case HL_FORCE_ABDUCTOR:
      return _("Abductors");
    case HL_FORCE_JOINT:
      return _("Joint");
    case HL_FORCE_CANE:
      return _("Cane");
    case HL_FORCE_LOAD_CONTRA:
    case HL_FORCE_LOAD_IPSI:
    case HL_FORCE_LOAD_MIDLINE:
    case HL_FORCE_N:
    default:
      break;
    }
  return _("Load");
}

/* Pushes (the joint reaction on the acetabulum, the cane on the hand) are
 * drawn ending at their point; pulls and weights start from it. */
static bool
force_is_push (HlForceKind kind)
{
  return kind == HL_FORCE_JOINT || kind == HL_FORCE_CANE;
}

static void
draw_forces (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
             Placer *pl, const HlScene *scene)
{
  const HlForceSet *fs = &scene->forces;
  for (int i = 0; i < fs->n; i++)
    {
      const HlForce *f = &fs->f[i];
      if (!(f->bw > FORCE_DRAW_MIN_BW) || !vfinite (f->vector))
        continue;
      HlPaletteRole role = force_role (f->kind);
      HlRgba c = hl_palette_color (role, style->dark);
      HlVec2 dir = vunit (f->vector, v2 (0, -1));
      HlVec2 d = vmul (dir, f->bw * HL_RENDER_FORCE_MM_PER_BW);
      bool push = force_is_push (f->kind);
      HlVec2 tail = push ? vsub (f->point, d) : f->point;
      HlVec2 head = push ? f->point : vadd (f->point, d);
      HlVec2 st = hl_view_to_screen (view, tail), sh = hl_view_to_screen (view, head);

      double dashes[HL_PALETTE_DASHES_MAX];
      int nd = hl_palette_dashes (role, dashes);
      set_rgba (cr, c, 1.0);
      arrow_path (cr, st, sh, f->kind == HL_FORCE_JOINT ? ARROW_JOINT_PX : ARROW_PX,
                  dashes, nd);

      if (!style->show_labels)
        continue;
      char text[64];
      snprintf (text, sizeof text, _("%s %.2f BW"), force_short (f->kind), f->bw);
      font (cr, style, 1.0, true);
      double w, h;
      label_size (cr, text, &w, &h);
      /* Beyond the free end of the arrow, clear of the bones' crowd. */
      HlVec2 free_end = push ? st : sh;
      HlVec2 away = vunit (push ? vsub (st, sh) : vsub (sh, st), v2 (0, 1));
      double reach = 0.5 * fabs (away.x) * w + 0.5 * fabs (away.y) * h + LABEL_GAP_PX;
      label_place (cr, style, pl, text, free_end.x + away.x * reach,
                  free_end.y + away.y * reach, c);
    }
}

static void
right_angle_mark (cairo_t *cr, HlVec2 corner, HlVec2 u1, HlVec2 u2, double size)
{
  HlVec2 a = vadd (corner, vmul (u1, size));
  HlVec2 b = vadd (a, vmul (u2, size));
  HlVec2 c = vadd (corner, vmul (u2, size));
  cairo_new_path (cr);
  cairo_move_to (cr, a.x, a.y);
  cairo_line_to (cr, b.x, b.y);
  cairo_line_to (cr, c.x, c.y);
  cairo_stroke (cr);
}

/* The abductor line of action, the weight line and the two moment arms. */
static void
draw_construction (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
                   Placer *pl, const HlScene *scene, double y_lo, double y_hi)
{
  const HlForceSet *fs = &scene->forces;
  const HlResult *res = &scene->result;
  HlVec2 hip = fs->hip_centre;
  HlVec2 o = fs->abductor_origin, ins = fs->abductor_insertion;
  HlVec2 u = vunit (vsub (ins, o), v2 (0, -1));

  HlRgba abd = hl_palette_color (HL_ROLE_ABDUCTOR, style->dark);
  HlRgba wc = hl_palette_color (HL_ROLE_WEIGHT, style->dark);
  static const double thin_dash[] = { 6.0, 3.0 };
  static const double dot_dash[] = { 1.5, 3.0 };

  cairo_set_line_width (cr, CONSTRUCTION_LINE_PX);
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_ROUND);

  cairo_set_dash (cr, thin_dash, 2, 0);
  set_rgba (cr, abd, CONSTRUCTION_ALPHA);
  draw_line_mm (cr, view, vsub (o, vmul (u, ABDUCTOR_LINE_EXTEND_MM)),
                vadd (ins, vmul (u, ABDUCTOR_LINE_EXTEND_MM)));

  HlVec2 wp = hip;
  for (int i = 0; i < fs->n; i++)
    if (fs->f[i].kind == HL_FORCE_WEIGHT)
      wp = fs->f[i].point;
  cairo_set_dash (cr, dot_dash, 2, 0);
  set_rgba (cr, wc, CONSTRUCTION_ALPHA);
  draw_line_mm (cr, view, v2 (wp.x, y_lo), v2 (wp.x, y_hi));

  /* Moment arms: perpendiculars from the hip centre. */
  HlVec2 foot = vadd (o, vmul (u, vdot (vsub (hip, o), u)));
  HlVec2 wfoot = v2 (wp.x, hip.y);
  HlVec2 sh = hl_view_to_screen (view, hip);
  HlVec2 sf = hl_view_to_screen (view, foot);
  HlVec2 sw = hl_view_to_screen (view, wfoot);

  cairo_set_dash (cr, NULL, 0, 0);
  set_rgba (cr, style->fg, CONSTRUCTION_ALPHA);
  cairo_new_path (cr);
  cairo_move_to (cr, sh.x, sh.y);
  cairo_line_to (cr, sf.x, sf.y);
  cairo_move_to (cr, sh.x, sh.y);
  cairo_line_to (cr, sw.x, sw.y);
  cairo_stroke (cr);

  HlVec2 su = vunit (vsub (hl_view_to_screen (view, ins),
                           hl_view_to_screen (view, o)), v2 (0, 1));
  HlVec2 to_hip = vunit (vsub (sh, sf), v2 (1, 0));
  if (vlen (vsub (sh, sf)) > 12.0)
    right_angle_mark (cr, sf, to_hip, su, 6.0);
  HlVec2 wdir = vunit (vsub (sh, sw), v2 (1, 0));
  if (vlen (vsub (sh, sw)) > 12.0)
    right_angle_mark (cr, sw, wdir, v2 (0, -1), 6.0);

  if (!style->show_labels)
    return;
  char text[64];
  font (cr, style, 0.9, false);
  snprintf (text, sizeof text, _("abductor arm %.1f mm"), res->abductor_arm_mm);
  HlVec2 mid = vmul (vadd (sh, sf), 0.5);
  HlVec2 off = v2 (-to_hip.y, to_hip.x);
  if (off.y > 0)
    off = vmul (off, -1.0);
  label_place (cr, style, pl, text, mid.x + off.x * 12.0, mid.y + off.y * 12.0 - 4.0,
              style->fg);
  snprintf (text, sizeof text, _("lever arm %.1f mm"), res->bw_arm_mm);
  mid = vmul (vadd (sh, sw), 0.5);
  label_place (cr, style, pl, text, mid.x, mid.y + 11.0, style->fg);
}

static void
draw_option_markers (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
                     const HlScene *scene)
{
  if (!scene->has_option)
    return;
  HlRgba c = hl_palette_color (HL_ROLE_OPTION, style->dark);
  set_rgba (cr, c, 1.0);
  cairo_set_line_width (cr, 1.6 * px_size);
  cairo_set_dash (cr, NULL, 0, 0);
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (!hl_landmarks_has (&scene->shown, (HlLandmarkId) i))
        continue;
      if (hl_landmarks_has (&scene->native, (HlLandmarkId) i)
          && vlen (vsub (scene->shown.p[i], scene->native.p[i])) < MOVED_MIN_MM)
        continue;
      HlVec2 s = hl_view_to_screen (view, scene->shown.p[i]);
      const double k = MARKER_HALF_PX;
      cairo_new_path (cr);
      cairo_move_to (cr, s.x - k, s.y - k);
      cairo_line_to (cr, s.x + k, s.y + k);
      cairo_move_to (cr, s.x - k, s.y + k);
      cairo_line_to (cr, s.x + k, s.y - k);
      cairo_stroke (cr);
    }
}

static void
handle_shape (cairo_t *cr, HlVec2 s, bool required, double r)
{
  cairo_new_path (cr);
  if (required)
    cairo_arc (cr, s.x, s.y, r, 0, 2 * M_PI);
  else
    {
      cairo_move_to (cr, s.x, s.y - r * 1.2);
      cairo_line_to (cr, s.x + r * 1.2, s.y);
      cairo_line_to (cr, s.x, s.y + r * 1.2);
      cairo_line_to (cr, s.x - r * 1.2, s.y);
      cairo_close_path (cr);
    }
}

static void
draw_handles (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
              Placer *pl, const HlScene *scene)
{
  cairo_set_dash (cr, NULL, 0, 0);
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (!hl_landmarks_has (&scene->native, (HlLandmarkId) i))
        continue;
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      bool req = info != NULL && info->required;
      HlVec2 s = hl_view_to_screen (view, scene->native.p[i]);
      if (!vfinite (s))
        continue;
      double r = req ? HANDLE_RADIUS_PX : HANDLE_OPTIONAL_RADIUS_PX;

      if (i == style->hover_landmark)
        {
          cairo_new_path (cr);
          cairo_arc (cr, s.x, s.y, r + HANDLE_HOVER_HALO_PX, 0, 2 * M_PI);
          set_rgba (cr, style->fg, 0.18);
          cairo_fill (cr);
        }
      handle_shape (cr, s, req, r);
      set_rgba (cr, hl_palette_color (req ? HL_ROLE_HANDLE : HL_ROLE_HANDLE_OPTIONAL,
                                      style->dark), 1.0);
      cairo_fill_preserve (cr);
      cairo_set_line_width (cr, 1.2 * px_size);
      set_rgba (cr, style->fg, 0.9);
      cairo_stroke (cr);

      if (i == style->selected_landmark)
        {
          cairo_new_path (cr);
          cairo_arc (cr, s.x, s.y, r + HANDLE_SELECT_RING_PX, 0, 2 * M_PI);
          cairo_set_line_width (cr, 2.0 * px_size);
          set_rgba (cr, style->fg, 1.0);
          cairo_stroke (cr);
        }
    }

  /* Labels last, above every handle. */
  for (int k = 0; k < 2; k++)
    {
      int i = k == 0 ? style->hover_landmark : style->selected_landmark;
      if (i < 0 || i >= HL_LM_COUNT || (k == 0 && i == style->selected_landmark)
          || !hl_landmarks_has (&scene->native, (HlLandmarkId) i))
        continue;
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      if (info == NULL)
        continue;
      HlVec2 p = scene->native.p[i];
      HlVec2 s = hl_view_to_screen (view, p);
      char text[HL_LABEL_MAX + 48];
      if (i == style->selected_landmark)
        snprintf (text, sizeof text, _("%s (%.1f, %.1f mm)"), _(info->label), p.x, p.y);
      else
        snprintf (text, sizeof text, "%s", _(info->label));
      font (cr, style, 1.0, i == style->selected_landmark);
      double w, h;
      label_size (cr, text, &w, &h);
      label_place (cr, style, pl, text, s.x + 14.0 + 0.5 * w, s.y - 12.0, style->fg);
    }
}

/* ---- Overlays in screen space ----------------------------------------------- */

static void
draw_side_markers (cairo_t *cr, const HlRenderStyle *style, double width)
{
  const char *letters[2] = { _("R"), _("L") };
  const char *words[2] = { _("patient's right"), _("patient's left") };
  for (int k = 0; k < 2; k++)
    {
      double x = k == 0 ? BOX_MARGIN_PX : width - BOX_MARGIN_PX - SIDE_MARKER_PX;
      double y = BOX_MARGIN_PX;
      cairo_new_path (cr);
      cairo_rectangle (cr, x, y, SIDE_MARKER_PX, SIDE_MARKER_PX);
      set_rgba (cr, style->bg, 0.9);
      cairo_fill_preserve (cr);
      set_rgba (cr, style->fg, 1.0);
      cairo_set_line_width (cr, 1.5 * px_size);
      cairo_set_dash (cr, NULL, 0, 0);
      cairo_stroke (cr);

      font (cr, style, 1.45, true);
      cairo_text_extents_t te;
      cairo_text_extents (cr, letters[k], &te);
      cairo_move_to (cr, x + 0.5 * (SIDE_MARKER_PX - te.width) - te.x_bearing,
                     y + 0.5 * (SIDE_MARKER_PX - te.height) - te.y_bearing);
      cairo_show_text (cr, letters[k]);

      font (cr, style, 0.8, false);
      cairo_text_extents (cr, words[k], &te);
      double tx = k == 0 ? x : x + SIDE_MARKER_PX - te.x_advance;
      double ty = y + SIDE_MARKER_PX + 1.0 * style->font_px;
      text_backing (cr, style, tx - 2.0 * px_size, ty - 0.9 * style->font_px,
                    te.x_advance + 4.0 * px_size, 1.15 * style->font_px);
      set_rgba (cr, style->fg, 0.75);
      cairo_move_to (cr, tx, y + SIDE_MARKER_PX + 1.0 * style->font_px);
      cairo_show_text (cr, words[k]);
    }
}

static void
draw_title (cairo_t *cr, const HlRenderStyle *style, const HlScene *scene,
            double width)
{
  if (scene->plan == NULL)
    return;
  char text[HL_LABEL_MAX + HL_NAME_MAX + 96];
  const char *side = scene->plan->side == HL_SIDE_LEFT ? _("left hip") : _("right hip");
  if (scene->has_option && (size_t) scene->option_index < scene->plan->n_options)
    snprintf (text, sizeof text, _("%s, %s: %s (native faint, dashed)"),
              scene->plan->label, side,
              scene->plan->options[scene->option_index].name);
  else
    snprintf (text, sizeof text, _("%s, %s: native"), scene->plan->label, side);

  font (cr, style, 1.05, true);
  cairo_text_extents_t te;
  cairo_text_extents (cr, text, &te);
  /* Between the side markers: smaller down to the smallest text, then
   * cut with an ellipsis. */
  double room = width - 2.0 * (BOX_MARGIN_PX * 2.0 + SIDE_MARKER_PX);
  if (te.x_advance > room)
    font (cr, style, fmax (1.05 * room / te.x_advance, SMALLEST_TEXT_SCALE), true);
  cairo_text_extents (cr, text, &te);
  size_t len = strlen (text);
  while (te.x_advance > room && len > 4)
    {
      /* Back to a character boundary, then "...". */
      len--;
      while (len > 0 && ((unsigned char) text[len] & 0xC0) == 0x80)
        len--;
      snprintf (text + len, sizeof text - len, "...");
      cairo_text_extents (cr, text, &te);
    }
  double tx = 0.5 * (width - te.x_advance), ty = BOX_MARGIN_PX + 1.2 * style->font_px;
  text_backing (cr, style, tx - 4.0 * px_size, ty - 1.15 * style->font_px,
                te.x_advance + 8.0 * px_size, 1.5 * style->font_px);
  set_rgba (cr, style->fg, 1.0);
  cairo_move_to (cr, tx, ty);
  cairo_show_text (cr, text);
}

/* The largest 1-2-5 step not above `limit`. */
static double
nice_step (double limit)
{
  if (!(limit > 0.0))
    return 1.0;
  double p = pow (10.0, floor (log10 (limit)));
  const double steps[] = { 5.0, 2.5, 2.0, 1.0 };
  for (size_t i = 0; i < N_ELEMENTS (steps); i++)
    if (steps[i] * p <= limit)
      return steps[i] * p;
  return p;
}

/* Draws (or only measures) a bar with its text; returns its box. */
static Rect
draw_bar (cairo_t *cr, const HlRenderStyle *style, double x, double y,
          double len, const char *text, HlRgba c, bool draw)
{
  font (cr, style, 0.9, false);
  cairo_text_extents_t te;
  cairo_text_extents (cr, text, &te);
  Rect box = { x - 1.0 * px_size, y - 0.75 * style->font_px,
               len + 6.0 * px_size + te.x_advance + 2.0 * px_size,
               0.75 * style->font_px + 0.45 * style->font_px };
  if (!draw)
    return box;
  text_backing (cr, style, box.x - 2.0 * px_size, box.y - 2.0 * px_size,
                box.w + 4.0 * px_size, box.h + 4.0 * px_size);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_set_line_width (cr, 2.0 * px_size);
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_BUTT);
  set_rgba (cr, c, 1.0);
  cairo_new_path (cr);
  cairo_move_to (cr, x, y - 5.0 * px_size);
  cairo_line_to (cr, x, y);
  cairo_line_to (cr, x + len, y);
  cairo_line_to (cr, x + len, y - 5.0 * px_size);
  cairo_stroke (cr);
  cairo_move_to (cr, x + len + 6.0 * px_size, y + 0.3 * style->font_px);
  cairo_show_text (cr, text);
  return box;
}

/* The mm scale bar (it follows the zoom) and the force scale, each kept
 * within the drawing's width; drawn, or only measured into bar[0] (mm)
 * and bar[1] (force). */
static void
draw_scale_bars (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
                 double width, double bottom, bool draw, Rect bar[2])
{
  char text[64];
  double x = BOX_MARGIN_PX + 2.0 * px_size;
  double room = fmax (width - x - BOX_MARGIN_PX - 9.0 * style->font_px, SCALE_BAR_MIN_PX);
  double max_px = fmin (SCALE_BAR_MAX_PX, room);
  double mm = nice_step (max_px / view->scale);
  if (mm * view->scale < SCALE_BAR_MIN_PX && 2.0 * max_px <= room)
    mm = nice_step (2.0 * max_px / view->scale);
  /* 50 mm reads at a glance against a pelvis about 250 mm wide. */
  if (mm > SCALE_BAR_PREFERRED_MM && SCALE_BAR_PREFERRED_MM * view->scale >= 1.5 * style->font_px)
    mm = SCALE_BAR_PREFERRED_MM;
  snprintf (text, sizeof text, _("%g mm"), mm);
  double line = 1.8 * style->font_px;
  bar[0] = draw_bar (cr, style, x, bottom - 0.7 * style->font_px, mm * view->scale,
                     text, style->fg, draw);

  double px_per_bw = HL_RENDER_FORCE_MM_PER_BW * view->scale;
  double bw = nice_step (max_px / px_per_bw);
  /* One body weight, the unit of every force label, wherever it is long
   * enough to see. */
  if (bw > 1.0 && px_per_bw >= 1.2 * style->font_px)
    bw = 1.0;
  snprintf (text, sizeof text, _("%g BW (force scale)"), bw);
  bar[1] = draw_bar (cr, style, x, bottom - 0.7 * style->font_px - line, bw * px_per_bw,
                     text, style->fg, draw);
}

/* kind: 0 an arrow, 1 a required handle, 2 an optional handle, 3 a moved
 * landmark, 4 the native femur, 5 both handles (the compact form). */
typedef struct {
  HlPaletteRole role;
  const char *text;
  int kind;
} LegendRow;

/* The legend's forms, tried in turn until one fits its corner: the full
 * one; a compact one (the smallest text, tighter rows, one row for both
 * kinds of landmark); the compact one in two columns. */
typedef struct {
  bool compact;
  int columns;
} LegendForm;

static const LegendForm legend_forms[] = { { false, 1 }, { true, 1 }, { true, 2 } };
#define LEGEND_FULL_SCALE 0.9
#define LEGEND_FULL_ROW_EM 1.35
#define LEGEND_COMPACT_ROW_EM 1.2
#define LEGEND_SAMPLE_PX (26.0 * px_size)
#define LEGEND_COMPACT_SAMPLE_PX (20.0 * px_size)

static void
legend_glyph (cairo_t *cr, const HlRenderStyle *style, const LegendRow *row, double sx,
              double cy, double sample)
{
  HlRgba c = hl_palette_color (row->role, style->dark);
  switch (row->kind)
    {
    case 0:
      {
        double dashes[HL_PALETTE_DASHES_MAX];
        int nd = hl_palette_dashes (row->role, dashes);
        set_rgba (cr, c, 1.0);
        arrow_path (cr, v2 (sx, cy), v2 (sx + sample, cy),
                    row->role == HL_ROLE_JOINT ? ARROW_JOINT_PX : ARROW_PX, dashes, nd);
      }
      break;
    case 1:
    case 2:
    case 5:
      for (int k = 1; k <= 2; k++)
        {
          if (row->kind != 5 && row->kind != k)
            continue;
          /* both: the round one left, the diamond right */
          double gx = row->kind != 5 ? sx + 0.5 * sample
                                     : sx + (k == 1 ? 0.25 : 0.75) * sample;
          double r = k == 1 ? HANDLE_RADIUS_PX : HANDLE_OPTIONAL_RADIUS_PX;
          if (row->kind == 5)
            r *= 0.8;
          handle_shape (cr, v2 (gx, cy), k == 1, r);
          set_rgba (cr, hl_palette_color (k == 1 ? HL_ROLE_HANDLE : HL_ROLE_HANDLE_OPTIONAL,
                                          style->dark), 1.0);
          cairo_fill_preserve (cr);
          set_rgba (cr, style->fg, 0.9);
          cairo_set_line_width (cr, 1.2 * px_size);
          cairo_stroke (cr);
        }
      break;
    case 3:
      set_rgba (cr, c, 1.0);
      cairo_set_line_width (cr, 1.6 * px_size);
      cairo_new_path (cr);
      cairo_move_to (cr, sx + 0.5 * sample - MARKER_HALF_PX, cy - MARKER_HALF_PX);
      cairo_line_to (cr, sx + 0.5 * sample + MARKER_HALF_PX, cy + MARKER_HALF_PX);
      cairo_move_to (cr, sx + 0.5 * sample - MARKER_HALF_PX, cy + MARKER_HALF_PX);
      cairo_line_to (cr, sx + 0.5 * sample + MARKER_HALF_PX, cy - MARKER_HALF_PX);
      cairo_stroke (cr);
      break;
    default:
      {
        static const double dash[] = { 5.0, 4.0 };
        cairo_set_dash (cr, dash, 2, 0);
        set_rgba (cr, style->fg, NATIVE_GHOST_ALPHA);
        cairo_set_line_width (cr, BONE_LINE_PX);
        cairo_new_path (cr);
        cairo_move_to (cr, sx, cy);
        cairo_line_to (cr, sx + sample, cy);
        cairo_stroke (cr);
        cairo_set_dash (cr, NULL, 0, 0);
      }
      break;
    }
}

/* Draws (or only measures into *box) the legend in the form given, its
 * bottom right corner at (width - margin, bottom); returns its width. */
static double
draw_legend (cairo_t *cr, const HlRenderStyle *style, const HlScene *scene,
             double width, double bottom, bool draw, Rect *box, LegendForm form)
{
  LegendRow rows[HL_FORCE_N + 4];
  int n = 0;
  if (scene->solved)
    {
      bool seen_load = false;
      for (int i = 0; i < scene->forces.n; i++)
        {
          const HlForce *f = &scene->forces.f[i];
          if (!(f->bw > FORCE_DRAW_MIN_BW))
            continue;
          HlPaletteRole role = force_role (f->kind);
          if (role == HL_ROLE_LOAD)
            {
              if (seen_load)
                continue;
              seen_load = true;
              rows[n++] = (LegendRow) { role, _("Carried load"), 0 };
              continue;
            }
          rows[n++] = (LegendRow) { role, hl_force_label (f->kind), 0 };
        }
    }
  if (form.compact)
    rows[n++] = (LegendRow) { HL_ROLE_HANDLE, _("Landmark: required, optional"), 5 };
  else
    {
      rows[n++] = (LegendRow) { HL_ROLE_HANDLE, _("Required landmark"), 1 };
      rows[n++] = (LegendRow) { HL_ROLE_HANDLE_OPTIONAL, _("Optional landmark"), 2 };
    }
  if (scene->has_option)
    {
      rows[n++] = (LegendRow) { HL_ROLE_OPTION, _("Option: moved landmark, cup"), 3 };
      rows[n++] = (LegendRow) { HL_ROLE_OPTION, _("Native femur"), 4 };
    }

  double scale = form.compact ? SMALLEST_TEXT_SCALE : LEGEND_FULL_SCALE;
  double row_h = style->font_px * scale * (form.compact ? LEGEND_COMPACT_ROW_EM
                                                        : LEGEND_FULL_ROW_EM / LEGEND_FULL_SCALE);
  double sample = form.compact ? LEGEND_COMPACT_SAMPLE_PX : LEGEND_SAMPLE_PX;
  int cols = form.columns > 1 && n > 1 ? form.columns : 1;
  int per_col = (n + cols - 1) / cols;
  font (cr, style, scale, false);
  double col_w[2] = { 0.0, 0.0 };
  for (int i = 0; i < n; i++)
    {
      cairo_text_extents_t te;
      cairo_text_extents (cr, rows[i].text, &te);
      int c = i / per_col;
      col_w[c] = fmax (col_w[c], te.x_advance + sample + 2.0 * LABEL_GAP_PX);
    }
  double bw = col_w[0] + (cols > 1 ? col_w[1] : 0.0) + LABEL_GAP_PX;
  double bh = per_col * row_h + LABEL_GAP_PX;
  double x = width - BOX_MARGIN_PX - bw, y = bottom - bh;
  if (box != NULL)
    *box = (Rect) { x, y, bw, bh };
  if (!draw)
    return bw;

  cairo_new_path (cr);
  cairo_rectangle (cr, x, y, bw, bh);
  set_rgba (cr, style->bg, 0.85);
  cairo_fill_preserve (cr);
  set_rgba (cr, style->fg, 0.3);
  cairo_set_line_width (cr, 1.0 * px_size);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_stroke (cr);

  for (int i = 0; i < n; i++)
    {
      int c = i / per_col;
      double cy = y + LABEL_GAP_PX * 0.5 + (i - c * per_col + 0.5) * row_h;
      double sx = x + LABEL_GAP_PX + (c > 0 ? col_w[0] : 0.0);
      legend_glyph (cr, style, &rows[i], sx, cy, sample);
      set_rgba (cr, style->fg, 1.0);
      font (cr, style, scale, false);
      cairo_move_to (cr, sx + sample + LABEL_GAP_PX, cy + 0.35 * style->font_px * scale / LEGEND_FULL_SCALE);
      cairo_show_text (cr, rows[i].text);
    }
  return bw;
}

/* When no form of the legend fits: a line in the smallest text says so
 * in its corner, so that it is never dropped silently. */
static Rect
legend_note (cairo_t *cr, const HlRenderStyle *style, double width, double bottom,
             bool draw)
{
  const char *text = _("No room for the legend at this size");
  font (cr, style, SMALLEST_TEXT_SCALE, false);
  cairo_text_extents_t te;
  cairo_text_extents (cr, text, &te);
  double h = style->font_px * SMALLEST_TEXT_SCALE * LEGEND_COMPACT_ROW_EM;
  double w = fmin (te.x_advance + 2.0 * LABEL_PAD_PX, width - 2.0 * BOX_MARGIN_PX);
  Rect r = { width - BOX_MARGIN_PX - w, bottom - h, w, h };
  if (draw)
    {
      cairo_save (cr);
      cairo_new_path (cr);
      cairo_rectangle (cr, r.x, r.y, r.w, r.h);
      set_rgba (cr, style->bg, 0.85);
      cairo_fill_preserve (cr);
      cairo_clip (cr);
      set_rgba (cr, style->fg, 0.8);
      cairo_move_to (cr, r.x + LABEL_PAD_PX, r.y + 0.78 * h);
      cairo_show_text (cr, text);
      cairo_restore (cr);
    }
  return r;
}

static void
draw_error_box (cairo_t *cr, const HlRenderStyle *style, const HlScene *scene,
                double width)
{
  double bw = fmin (width - 2.0 * BOX_MARGIN_PX, ERROR_BOX_MAX_PX);
  double pad = 10.0;
  Wrapped lines;
  font (cr, style, 1.0, false);
  const char *msg = scene->error.message[0] ? scene->error.message
                                            : _("The plan cannot be solved.");
  wrap_text (cr, msg, bw - 2.0 * pad, &lines);
  char where[HL_ERROR_FIELD_MAX + 32] = "";
  if (scene->error.field[0])
    snprintf (where, sizeof where, _("Where: %s"), scene->error.field);

  double lh = style->font_px * 1.35;
  double bh = pad * 2.0 + lh * (1.3 + lines.n + (where[0] ? 1 : 0));
  double x = 0.5 * (width - bw);
  double y = BOX_MARGIN_PX + SIDE_MARKER_PX + 22.0;

  cairo_new_path (cr);
  cairo_rectangle (cr, x, y, bw, bh);
  set_rgba (cr, hl_palette_color (HL_ROLE_ERROR_FILL, style->dark), 1.0);
  cairo_fill_preserve (cr);
  set_rgba (cr, hl_palette_color (HL_ROLE_ERROR, style->dark), 1.0);
  cairo_set_line_width (cr, 2.0 * px_size);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_stroke (cr);

  double ty = y + pad + lh * 0.9;
  font (cr, style, 1.1, true);
  set_rgba (cr, hl_palette_color (HL_ROLE_ERROR, style->dark), 1.0);
  cairo_move_to (cr, x + pad, ty);
  cairo_show_text (cr, _("No forces: this plan cannot be solved"));
  ty += lh * 1.3;
  font (cr, style, 1.0, false);
  set_rgba (cr, style->fg, 1.0);
  for (int i = 0; i < lines.n; i++, ty += lh)
    {
      cairo_move_to (cr, x + pad, ty);
      cairo_show_text (cr, lines.line[i]);
    }
  if (where[0])
    {
      set_rgba (cr, style->fg, 0.75);
      cairo_move_to (cr, x + pad, ty);
      cairo_show_text (cr, where);
    }
}

/* The caution at the foot; returns its height. */
static double
draw_caution (cairo_t *cr, const HlRenderStyle *style, double width,
              double height, bool draw)
{
  Wrapped lines;
  font (cr, style, CAUTION_FONT_SCALE, false);
  wrap_text (cr, hl_caution_text (), width - 2.0 * BOX_MARGIN_PX, &lines);
  double lh = style->font_px * CAUTION_LINE_EM;
  double bh = lines.n * lh + CAUTION_PAD_PX;
  double y = height - bh;
  if (!draw)
    return bh;

  cairo_new_path (cr);
  cairo_rectangle (cr, 0, y, width, bh);
  set_rgba (cr, style->bg, style->over_image ? 1.0 : 0.92);
  cairo_fill (cr);
  set_rgba (cr, style->fg, 0.4);
  cairo_set_line_width (cr, 1.0 * px_size);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_new_path (cr);
  cairo_move_to (cr, 0, y + 0.5);
  cairo_line_to (cr, width, y + 0.5);
  cairo_stroke (cr);

  set_rgba (cr, style->fg, 0.9);
  for (int i = 0; i < lines.n; i++)
    {
      cairo_move_to (cr, BOX_MARGIN_PX, y + 0.5 * CAUTION_PAD_PX + (i + 0.8) * lh);
      cairo_show_text (cr, lines.line[i]);
    }
  return bh;
}

/* ---- The whole schematic ---------------------------------------------------- */

/* The base layer's digest: what it draws besides the shapes. */
static void
digest_base (Digest *key, const HlView *view, const HlRenderStyle *style,
             double width, double height, const Shapes *sh)
{
  const HlRgba colours[2] = { style->fg, style->bg };

  digest_double (key, view->scale);
  digest_double (key, view->tx);
  digest_double (key, view->ty);
  digest_double (key, width);
  digest_double (key, height);
  digest_double (key, px_size);
  digest_double (key, style->font_px);
  for (int k = 0; k < 2; k++)
    {
      digest_double (key, colours[k].r);
      digest_double (key, colours[k].g);
      digest_double (key, colours[k].b);
      digest_double (key, colours[k].a);
    }
  digest_bytes (key, &style->dark, sizeof style->dark);
  digest_bytes (key, &style->paint_background, sizeof style->paint_background);
  digest_bytes (key, &style->hide_schematic, sizeof style->hide_schematic);
  digest_bytes (key, &style->show_labels, sizeof style->show_labels);
  /* What draw_pelvis draws from. */
  digest_bytes (key, &sh->pelvis.ok, sizeof sh->pelvis.ok);
  if (sh->pelvis.ok)
    {
      digest_frame (key, &sh->pelvis.f);
      digest_hemi (key, &sh->sacrum_frame);
      for (int s = 0; s < 2; s++)
        {
          digest_poly (key, &sh->hemi[s]);
          digest_poly (key, &sh->obturator[s]);
        }
      digest_poly (key, &sh->sacrum);
    }
}

/* hl_render_scene by layers; with `key` (and no layers) only the base
 * layer's digest, nothing drawn. */
static void
scene_draw (cairo_t *cr, const HlScene *scene, const HlView *view,
            const HlRenderStyle *style, double width, double height,
            unsigned layers, Digest *key)
{
  bool base_layer = (layers & HL_RENDER_LAYER_BASE) != 0;
  bool top_layer = (layers & HL_RENDER_LAYER_TOP) != 0;

  if (cr == NULL || scene == NULL || view == NULL || style == NULL
      || !(view->scale > 0.0) || !isfinite (view->scale))
    return;
  px_size = style->size > 0.0 && isfinite (style->size) ? style->size : 1.0;
  if (style->layout != NULL)
    style->layout->n = 0;
  cairo_save (cr);
  cairo_set_tolerance (cr, CURVE_TOLERANCE_PX);
  /* Bevel joins look the same as round ones on smooth outlines at these
   * widths and stroke faster. */
  cairo_set_line_join (cr, CAIRO_LINE_JOIN_BEVEL);
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_ROUND);

  if (base_layer && style->paint_background)
    {
      set_rgba (cr, style->bg, 1.0);
      cairo_paint (cr);
    }

  Shapes sh;
  shapes_build (scene, &sh);

  /* Vertical span of the lines that cross the whole drawing. */
  HlVec2 top = hl_view_to_plan (view, v2 (0, 0));
  HlVec2 bottom = hl_view_to_plan (view, v2 (0, height));
  double x0, y0, x1, y1;
  hl_scene_bounds (scene, &x0, &y0, &x1, &y1);
  double y_hi = fmin (top.y, y1 + 20.0), y_lo = fmax (bottom.y, y0 - 20.0);

  /* Handles first in the placer: no label may cover one. */
  Placer pl = { .n = 0, .width = width, .height = height };
  const double hr = HANDLE_RADIUS_PX + 2.0 * px_size;
  for (int i = 0; i < HL_LM_COUNT; i++)
    if (hl_landmarks_has (&scene->native, (HlLandmarkId) i))
      {
        HlVec2 s = hl_view_to_screen (view, scene->native.p[i]);
        placer_add (&pl, s.x - hr, s.y - hr, 2.0 * hr, 2.0 * hr);
      }

  /* Then the overlays in screen space, measured before any label is
   * placed, so that no label covers the frame, the bars, the legend or
   * the caution.  A legend that would crowd a small drawing is left out:
   * the force labels name the forces. */
  double foot = height;
  if (style->show_caution)
    {
      double ch = draw_caution (cr, style, width, height, false);
      foot -= ch;
      placer_add (&pl, 0.0, height - ch, width, ch);
      layout_add (style, HL_BOX_CAUTION, 0.0, height - ch, width, ch);
    }
  Rect bars[2];
  if (style->show_frame)
    {
      double band = BOX_MARGIN_PX + SIDE_MARKER_PX + 1.3 * style->font_px;
      placer_add (&pl, 0.0, 0.0, width, band);
      layout_add (style, HL_BOX_FRAME, 0.0, 0.0, width, band);
      draw_scale_bars (cr, view, style, width, foot - BOX_MARGIN_PX * 0.5, false, bars);
      for (int k = 0; k < 2; k++)
        {
          placer_add (&pl, bars[k].x, bars[k].y, bars[k].w, bars[k].h);
          layout_add (style, k == 0 ? HL_BOX_SCALE_BAR : HL_BOX_FORCE_SCALE,
                      bars[k].x, bars[k].y, bars[k].w, bars[k].h);
        }
    }
  /* The legend in the first of its forms that leaves the drawing room
   * (at most 60% of the height below the frame and half the width); when
   * none does, a line says it is left out. */
  bool legend = false, legend_noted = false;
  LegendForm form = legend_forms[0];
  Rect legend_box = { 0 };
  double legend_bottom = foot - BOX_MARGIN_PX;
  if (style->show_legend)
    {
      double room = foot - (style->show_frame ? BOX_MARGIN_PX + SIDE_MARKER_PX : 0.0);
      for (size_t k = 0; k < N_ELEMENTS (legend_forms) && !legend; k++)
        {
          form = legend_forms[k];
          draw_legend (cr, style, scene, width, legend_bottom, false, &legend_box, form);
          legend = legend_box.h <= 0.6 * room && legend_box.w <= 0.5 * width;
        }
      if (!legend)
        {
          legend_box = legend_note (cr, style, width, legend_bottom, false);
          legend_noted = true;
        }
      placer_add (&pl, legend_box.x, legend_box.y, legend_box.w, legend_box.h);
      layout_add (style, HL_BOX_LEGEND, legend_box.x, legend_box.y, legend_box.w,
                  legend_box.h);
    }
  if (style->layout != NULL)
    {
      style->layout->legend_shown = legend;
      style->layout->legend_compact = legend && form.compact;
      style->layout->legend_noted = legend_noted;
      style->layout->body_text_px = SMALLEST_TEXT_SCALE * style->font_px;
    }

  /* The base layer: its state is restored after it, so the top layer
   * draws the same with it or over a picture of it. */
  if (key != NULL)
    digest_base (key, view, style, width, height, &sh);
  cairo_save (cr);
  if (!style->hide_schematic)
    {
      draw_midline (cr, view, style, &pl, scene, &sh, y_lo, y_hi, base_layer, key);
      if (base_layer)
        draw_pelvis (cr, view, style, &sh);
    }
  cairo_restore (cr);
  if (!top_layer)
    {
      cairo_restore (cr);
      return;
    }

  if (!style->hide_schematic)
    {
      draw_femur (cr, view, style, &sh.other_femur, false);
      draw_femur (cr, view, style, &sh.shown_femur, false);
      draw_acetabula (cr, view, style, &sh);
    }
  if (scene->has_option && !style->hide_schematic)
    {
      draw_femur (cr, view, style, &sh.native_femur, true);
      if (sh.shown_femur.ok && !scene->has_template)
        draw_cup (cr, view, style, sh.shown_femur.head, sh.shown_femur.head_r,
                  side_lateral_sign (scene->plan->side));
    }

  if (scene->solved)
    {
      draw_construction (cr, view, style, &pl, scene, y_lo, y_hi);
      draw_forces (cr, view, style, &pl, scene);
    }
  if (scene->has_template)
    hl_render_template (cr, scene, view, style);
  draw_option_markers (cr, view, style, scene);
  draw_handles (cr, view, style, &pl, scene);

  if (style->show_frame)
    {
      draw_side_markers (cr, style, width);
      draw_title (cr, style, scene, width);
    }
  if (style->show_caution)
    draw_caution (cr, style, width, height, true);
  if (style->show_frame)
    draw_scale_bars (cr, view, style, width, foot - BOX_MARGIN_PX * 0.5, true, bars);
  if (legend)
    draw_legend (cr, style, scene, width, legend_bottom, true, NULL, form);
  else if (legend_noted)
    legend_note (cr, style, width, legend_bottom, true);
  if (!scene->solved)
    draw_error_box (cr, style, scene, width);

  cairo_restore (cr);
}

void
hl_render_scene (cairo_t *cr, const HlScene *scene, const HlView *view,
                 const HlRenderStyle *style, double width, double height)
{
  scene_draw (cr, scene, view, style, width, height, HL_RENDER_LAYERS_ALL, NULL);
}

void
hl_render_scene_layers (cairo_t *cr, const HlScene *scene, const HlView *view,
                        const HlRenderStyle *style, double width, double height,
                        HlRenderLayers layers)
{
  scene_draw (cr, scene, view, style, width, height, layers, NULL);
}

uint64_t
hl_render_scene_base_key (cairo_t *cr, const HlScene *scene, const HlView *view,
                          const HlRenderStyle *style, double width, double height)
{
  Digest key = DIGEST_INIT;

  if (cr == NULL || scene == NULL || view == NULL || style == NULL
      || !(view->scale > 0.0) || !isfinite (view->scale))
    return 0;
  scene_draw (cr, scene, view, style, width, height, 0, &key);
  return key.h != 0 ? key.h : 1;
}

void
hl_render_schematic (cairo_t *cr, const HlPlan *plan, int option_index,
                     const HlView *view, const HlRenderStyle *style,
                     double width, double height)
{
  HlScene scene;
  hl_scene_build (&scene, plan, option_index);
  hl_render_scene (cr, &scene, view, style, width, height);
}

int
hl_render_hit_landmark (const HlPlan *plan, const HlView *view, double sx,
                        double sy, double radius_px)
{
  if (plan == NULL || view == NULL)
    return -1;
  int best = -1;
  double best_d = radius_px;
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (!hl_landmarks_has (&plan->landmarks, (HlLandmarkId) i))
        continue;
      HlVec2 s = hl_view_to_screen (view, plan->landmarks.p[i]);
      double d = hypot (s.x - sx, s.y - sy);
      if (d <= best_d)
        {
          best_d = d;
          best = i;
        }
    }
  return best;
}

/* ---- Figures ---------------------------------------------------------------- */

/* The style, scene and view of a figure. */
static void
figure_setup (const HlPlan *plan, int option_index, int width, int height,
              HlRenderPreset preset, HlRenderStyle *style, HlScene *scene, HlView *view)
{
  hl_render_style_init (style, false);
  hl_render_style_for_target (style, width, height, preset);
  style->show_caution = true;
  hl_scene_build (scene, plan, option_index);
  /* The margin at this figure's size, not at the last drawing's. */
  px_size = style->size;
  hl_render_fit_view_framed (scene, style, width, height, FIT_MARGIN_PX, view);
}

void
hl_render_figure_view (const HlPlan *plan, int option_index, int width, int height,
                       HlRenderPreset preset, HlView *view)
{
  HlRenderStyle style;
  HlScene scene;
  figure_setup (plan, option_index, width, height, preset, &style, &scene, view);
}

void
hl_render_figure_draw (cairo_t *cr, const HlPlan *plan, int option_index,
                       int width, int height, HlRenderPreset preset,
                       HlUnderlay *underlay, HlRenderLayout *layout)
{
  HlRenderStyle style;
  HlScene scene;
  HlView view;
  figure_setup (plan, option_index, width, height, preset, &style, &scene, &view);
  style.layout = layout;
  if (underlay != NULL)
    {
      /* The paper, then the radiograph at the figure's scale (1 device px
       * per px of the figure), then the drawing over it. */
      set_rgba (cr, style.bg, 1.0);
      cairo_paint (cr);
      if (hl_underlay_draw_plan (underlay, cr, plan, &view, 1.0))
        {
          style.paint_background = false;
          style.over_image = true;
          style.hide_schematic = !plan->radiograph.schematic_visible;
        }
    }
  hl_render_scene (cr, &scene, &view, &style, width, height);
}
