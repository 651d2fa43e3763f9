/* hl-render-template.c: the implant templates on the picture.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Draws only: every point comes from hl_template_shape (core).
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "hl-i18n.h"
#include "hl-render-template.h"

#define N_ELEMENTS(a) (sizeof (a) / sizeof (a)[0])
#define FILL_ALPHA 0.16
#define OUTLINE_PX 1.6
#define FACE_PX 2.2
#define THIN_PX 1.1
#define CENTRE_MARK_PX 6.0

static const double dash_dot[] = { 9.0, 3.0, 2.0, 3.0 };
static const double dotted[] = { 1.5, 3.0 };

static void
set_rgba (cairo_t *cr, HlRgba c, double alpha)
{
  cairo_set_source_rgba (cr, c.r, c.g, c.b, c.a * alpha);
}

static void
line_mm (cairo_t *cr, const HlView *view, HlVec2 a, HlVec2 b)
{
  HlVec2 sa = hl_view_to_screen (view, a), sb = hl_view_to_screen (view, b);
  cairo_move_to (cr, sa.x, sa.y);
  cairo_line_to (cr, sb.x, sb.y);
}

static void
square_handle (cairo_t *cr, const HlView *view, const HlRenderStyle *style,
               HlVec2 at, bool hover, bool selected)
{
  HlVec2 s = hl_view_to_screen (view, at);
  double k = HL_RENDER_TEMPLATE_HANDLE_PX * (hover || selected ? 1.3 : 1.0);
  HlRgba fill = hl_palette_color (HL_ROLE_HANDLE, style->dark);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_new_path (cr);
  cairo_rectangle (cr, s.x - k, s.y - k, 2.0 * k, 2.0 * k);
  set_rgba (cr, fill, 1.0);
  cairo_fill_preserve (cr);
  set_rgba (cr, style->fg, 1.0);
  cairo_set_line_width (cr, selected ? 2.4 : 1.2);
  cairo_stroke (cr);
  if (selected)
    {
      cairo_rectangle (cr, s.x - k - 3.0, s.y - k - 3.0, 2.0 * k + 6.0, 2.0 * k + 6.0);
      cairo_set_line_width (cr, 1.0);
      cairo_stroke (cr);
    }
}

static void
draw_cup (cairo_t *cr, const HlTemplateShape *t, const HlView *view,
          const HlRenderStyle *style, HlRgba c)
{
  HlVec2 s = hl_view_to_screen (view, t->cup_centre);
  double r = t->cup_radius_mm * view->scale;
  /* Screen y is down: a plan angle a is -a on screen, and the sweep turns. */
  cairo_new_path (cr);
  cairo_arc_negative (cr, s.x, s.y, r, -t->dome_start_rad, -t->dome_end_rad);
  cairo_close_path (cr);
  set_rgba (cr, c, FILL_ALPHA);
  cairo_fill_preserve (cr);
  set_rgba (cr, c, 1.0);
  cairo_set_line_width (cr, OUTLINE_PX);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_stroke (cr);

  /* The open half of the circle, faint, so the whole size reads. */
  cairo_new_path (cr);
  cairo_arc (cr, s.x, s.y, r, -t->dome_start_rad, -t->dome_end_rad + 2.0 * M_PI);
  set_rgba (cr, c, 0.45);
  cairo_set_line_width (cr, THIN_PX);
  cairo_set_dash (cr, dotted, N_ELEMENTS (dotted), 0);
  cairo_stroke (cr);

  /* The face line, dash-dot and heavier: its angle is the inclination. */
  cairo_new_path (cr);
  line_mm (cr, view, t->face_medial, t->face_lateral);
  set_rgba (cr, c, 1.0);
  cairo_set_line_width (cr, FACE_PX);
  cairo_set_dash (cr, dash_dot, N_ELEMENTS (dash_dot), 0);
  cairo_stroke (cr);
  /* ... and its lever to the inclination handle. */
  cairo_new_path (cr);
  line_mm (cr, view, t->face_lateral, t->inclination_handle);
  cairo_set_line_width (cr, THIN_PX);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_stroke (cr);

  /* The liner's rotation centre: a ringed cross in ink, joined to the
   * cup centre when the liner moves it. */
  HlVec2 rc = hl_view_to_screen (view, t->rotation_centre);
  if (hypot (rc.x - s.x, rc.y - s.y) > 0.5)
    {
      cairo_new_path (cr);
      cairo_move_to (cr, s.x, s.y);
      cairo_line_to (cr, rc.x, rc.y);
      set_rgba (cr, style->fg, 0.8);
      cairo_set_line_width (cr, THIN_PX);
      cairo_stroke (cr);
    }
  const double k = CENTRE_MARK_PX;
  cairo_new_path (cr);
  cairo_move_to (cr, rc.x - k, rc.y);
  cairo_line_to (cr, rc.x + k, rc.y);
  cairo_move_to (cr, rc.x, rc.y - k);
  cairo_line_to (cr, rc.x, rc.y + k);
  cairo_new_sub_path (cr);
  cairo_arc (cr, rc.x, rc.y, 0.6 * k, 0, 2.0 * M_PI);
  set_rgba (cr, style->fg, 1.0);
  cairo_set_line_width (cr, THIN_PX);
  cairo_stroke (cr);
}

static void
draw_stem (cairo_t *cr, const HlTemplateShape *t, const HlView *view,
           const HlRenderStyle *style, HlRgba c)
{
  /* The shaft axis the stem slides along. */
  cairo_new_path (cr);
  line_mm (cr, view, t->axis_distal, t->axis_proximal);
  set_rgba (cr, c, 0.7);
  cairo_set_line_width (cr, THIN_PX);
  cairo_set_dash (cr, dash_dot, N_ELEMENTS (dash_dot), 0);
  cairo_stroke (cr);

  cairo_new_path (cr);
  for (size_t i = 0; i < t->n_body; i++)
    {
      HlVec2 s = hl_view_to_screen (view, t->body[i]);
      if (i == 0)
        cairo_move_to (cr, s.x, s.y);
      else
        cairo_line_to (cr, s.x, s.y);
    }
  cairo_close_path (cr);
  set_rgba (cr, c, FILL_ALPHA);
  cairo_fill_preserve (cr);
  set_rgba (cr, c, 1.0);
  cairo_set_line_width (cr, OUTLINE_PX);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_stroke (cr);

  /* The neck, from the body's top on the axis to the head centre. */
  cairo_new_path (cr);
  line_mm (cr, view, t->neck_base, t->head_centre);
  set_rgba (cr, c, 1.0);
  cairo_set_line_width (cr, FACE_PX + 1.0);
  cairo_stroke (cr);

  /* The head, dotted, with its centre. */
  HlVec2 h = hl_view_to_screen (view, t->head_centre);
  cairo_new_path (cr);
  cairo_arc (cr, h.x, h.y, t->head_radius_mm * view->scale, 0, 2.0 * M_PI);
  set_rgba (cr, c, 1.0);
  cairo_set_line_width (cr, OUTLINE_PX);
  cairo_set_dash (cr, dotted, N_ELEMENTS (dotted), 0);
  cairo_stroke (cr);
  cairo_set_dash (cr, NULL, 0, 0);
  cairo_new_path (cr);
  cairo_arc (cr, h.x, h.y, 2.0, 0, 2.0 * M_PI);
  cairo_fill (cr);
}

static void
draw_message (cairo_t *cr, const HlRenderStyle *style, const char *text)
{
  if (text == NULL || text[0] == '\0')
    return;
  cairo_select_font_face (cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                          CAIRO_FONT_WEIGHT_NORMAL);
  cairo_set_font_size (cr, style->font_px);
  set_rgba (cr, hl_palette_color (HL_ROLE_ERROR, style->dark), 1.0);
  cairo_move_to (cr, 12.0, 3.2 * style->font_px + 30.0);
  cairo_show_text (cr, text);
  cairo_new_path (cr);
}

void
hl_render_template (cairo_t *cr, const HlScene *scene, const HlView *view,
                    const HlRenderStyle *style)
{
  if (cr == NULL || scene == NULL || !scene->has_template)
    return;
  const HlTemplateShape *t = &scene->tmpl;
  HlRgba c = hl_palette_color (HL_ROLE_OPTION, style->dark);
  cairo_save (cr);
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_BUTT);
  if (t->stem)
    draw_stem (cr, t, view, style, c);
  if (t->cup)
    draw_cup (cr, t, view, style, c);
  /* Handles: only where the picture is interactive or a part is in
   * focus; figures and reports show them too, they mark the placement. */
  for (int part = 0; part < HL_TEMPLATE_PART_N; part++)
    {
      HlVec2 at;
      if (hl_render_template_handle (t, part, &at))
        square_handle (cr, view, style, at, style->hover_template == part,
                       style->selected_template == part);
    }
  if (!t->cup || !t->stem)
    draw_message (cr, style, t->message);
  cairo_restore (cr);
}

bool
hl_render_template_handle (const HlTemplateShape *t, int part, HlVec2 *out)
{
  switch (part)
    {
    case HL_TEMPLATE_PART_CUP:
      if (!t->cup)
        return false;
      *out = t->cup_centre;
      return true;
    case HL_TEMPLATE_PART_INCLINATION:
      if (!t->cup)
        return false;
      *out = t->inclination_handle;
      return true;
    case HL_TEMPLATE_PART_STEM:
      if (!t->stem)
        return false;
      *out = t->stem_origin;
      return true;
    default:
      return false;
    }
}

/* Even-odd rule on the screen polygon. */
static bool
inside_body (const HlTemplateShape *t, const HlView *view, double sx, double sy)
{
  bool in = false;
  for (size_t i = 0, j = t->n_body - 1; i < t->n_body; j = i++)
    {
      HlVec2 a = hl_view_to_screen (view, t->body[i]);
      HlVec2 b = hl_view_to_screen (view, t->body[j]);
      if ((a.y > sy) != (b.y > sy)
          && sx < (b.x - a.x) * (sy - a.y) / (b.y - a.y) + a.x)
        in = !in;
    }
  return in;
}

int
hl_render_hit_template (const HlTemplateShape *t, const HlView *view,
                        double sx, double sy, double radius_px)
{
  if (t == NULL)
    return -1;
  int best = -1;
  double best_d = radius_px;
  static const int order[] = { HL_TEMPLATE_PART_INCLINATION, HL_TEMPLATE_PART_STEM,
                               HL_TEMPLATE_PART_CUP };
  for (size_t k = 0; k < N_ELEMENTS (order); k++)
    {
      HlVec2 at;
      if (!hl_render_template_handle (t, order[k], &at))
        continue;
      HlVec2 s = hl_view_to_screen (view, at);
      double d = hypot (s.x - sx, s.y - sy);
      if (d <= best_d)
        {
          best = order[k];
          best_d = d;
        }
    }
  if (best >= 0)
    return best;
  if (t->cup)
    {
      HlVec2 s = hl_view_to_screen (view, t->cup_centre);
      if (hypot (s.x - sx, s.y - sy) <= t->cup_radius_mm * view->scale)
        return HL_TEMPLATE_PART_CUP;
    }
  if (t->stem && t->n_body >= 3 && inside_body (t, view, sx, sy))
    return HL_TEMPLATE_PART_STEM;
  return -1;
}

const char *
hl_template_part_name (int part)
{
  switch (part)
    {
    case HL_TEMPLATE_PART_CUP:
      return _("cup");
    case HL_TEMPLATE_PART_INCLINATION:
      return _("cup inclination");
    case HL_TEMPLATE_PART_STEM:
      return _("stem");
    default:
      return "";
    }
}
