/* hl-render.h: the schematic drawn with cairo alone (no GTK).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The canvas draws with it on screen; the command line draws figures and
 * reports with it.  It never computes mechanics: the forces, moment arms
 * and their lengths come from the core (hl_model_prepare, hl_model_solve,
 * hl_model_forces); the bones are simple outlines laid over the landmarks.
 *
 * Screen coordinates are device-independent units (px at scale 1, cairo
 * user space) with y down.  A view maps the plan frame (mm, x towards the
 * patient's left, y superior) to the screen in the radiographic convention,
 * the patient's right on the viewer's left:
 *
 *     sx = x * scale + tx,     sy = -y * scale + ty
 *
 * Forces are drawn to one scale, HL_RENDER_FORCE_MM_PER_BW millimetres of
 * drawing per body weight, so every arrow compares with every other and
 * with the bones.
 *
 * Handles are always the NATIVE landmarks: with an option selected, the
 * option's moved femoral landmarks are drawn as small crosses that cannot
 * be picked, and the native femur stays visible, faint and dashed, under
 * the option's femur.
 */
#pragma once

#include <stdbool.h>
#include <stdint.h>
#include <cairo.h>

#include "hl-palette.h"
#include "hl-plan.h"
#include "hl-scene.h"
#include "hl-solve.h"
#include "hl-template-shape.h"
#include "hl-view.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Millimetres of drawing per body weight of force. */
#define HL_RENDER_FORCE_MM_PER_BW 40.0
/* A radiograph under a drawing (hl-underlay.h). */
typedef struct _HlUnderlay HlUnderlay;

/* Views (HlView, plan <-> screen): hl-view.h. */

/* ---- Layout ----------------------------------------------------------- */

/* What a drawing placed where, in px of the target: recorded when the
 * style asks for it, so that tests can check the layout without a
 * display (no two labels overlap, the bars and the legend lie inside). */
typedef enum {
  HL_BOX_LABEL,        /* a force value, a moment arm, a landmark name */
  HL_BOX_SCALE_BAR,    /* the mm scale bar with its text */
  HL_BOX_FORCE_SCALE,  /* the force scale with its text */
  HL_BOX_LEGEND,
  HL_BOX_CAUTION,
  HL_BOX_FRAME,        /* the side markers and the title */
} HlBoxKind;

#define HL_RENDER_LAYOUT_MAX 64

typedef struct {
  HlBoxKind kind;
  double x, y, w, h;
} HlRenderBox;

typedef struct {
  int n;
  HlRenderBox box[HL_RENDER_LAYOUT_MAX];
  double body_text_px;   /* the font size of label text, px */
  bool legend_shown;     /* the legend is drawn (its box is HL_BOX_LEGEND) */
  bool legend_compact;   /* ... in its compact form (a small or crowded drawing) */
  bool legend_noted;     /* no form fits: a line in the legend's corner (the
                          * HL_BOX_LEGEND box) says it is left out */
} HlRenderLayout;

/* ---- Style ------------------------------------------------------------ */

/* Targets with their own text size. */
typedef enum {
  HL_RENDER_PRESET_AUTO = 0,   /* text and markers follow the target's size */
  HL_RENDER_PRESET_SLIDE,      /* a 16:9 slide, 1920 x 1080 px, body text >= 24 px */
  HL_RENDER_PRESET_HALF_SLIDE, /* half a 16:9 slide, 960 x 1080 px, body text >= 24 px */
} HlRenderPreset;

/* Body text of a slide preset, px: readable from the back of a room
 * (common practice for slides). */
#define HL_RENDER_SLIDE_TEXT_PX 24.0
/* The smallest body text of any target, px. */
#define HL_RENDER_TEXT_MIN_PX 8.0

typedef struct {
  bool dark;                 /* dark theme: lighter variants of the palette */
  HlRgba fg;                 /* text and outlines (the widget's colour) */
  HlRgba bg;                 /* what lies under the drawing */
  bool paint_background;     /* fill with bg first (figures); the canvas lets
                              * the widget's own background show */
  bool show_caution;         /* hl_caution_text () at the foot (exports) */
  bool show_frame;           /* R/L side markers, title and scale bars */
  bool show_legend;
  bool show_labels;          /* force values and moment arm lengths */
  bool hide_schematic;       /* no bones, midline or cups: a radiograph
                              * shows them (forces and handles stay) */
  bool over_image;           /* drawn over a radiograph: the frame's text
                              * (title, side words, bars) on a pale backing */
  bool text_backing;         /* that backing alone, bones as without an image
                              * (the window over its radiograph) */
  int hover_landmark;        /* HlLandmarkId or -1 */
  int selected_landmark;     /* HlLandmarkId or -1 */
  int hover_template;        /* HlTemplatePart (hl-render-template.h) or -1 */
  int selected_template;     /* HlTemplatePart or -1 */
  double font_px;            /* base text size */
  double size;               /* multiplies every px size (markers, lines,
                              * gaps, bands); 1 on screen */
  HlRenderLayout *layout;    /* NULL, or where to record the layout */
} HlRenderStyle;

/* The light (figures, reports) or dark defaults. */
void hl_render_style_init (HlRenderStyle *style, bool dark);

/* Text, markers, lines and bands sized for a width x height target: one
 * description for every output.  The default figure (1200 x 900) keeps
 * the screen's sizes; smaller and larger targets scale, with the text never
 * below HL_RENDER_TEXT_MIN_PX; the slide presets give at least
 * HL_RENDER_SLIDE_TEXT_PX. */
void hl_render_style_for_target (HlRenderStyle *style, double width,
                                 double height, HlRenderPreset preset);

/* The size of a preset (AUTO: unchanged). */
void hl_render_preset_size (HlRenderPreset preset, int *width, int *height);

/* ---- Scenes ----------------------------------------------------------- */

/* HlScene, hl_scene_build and hl_scene_build_solved: core/hl-scene.h. */

/* The plan-frame box around the placed landmarks and the drawn bones.
 * Returns false (and a default box around the origin) when nothing is
 * placed. */
bool hl_scene_bounds (const HlScene *scene, double *x0, double *y0,
                      double *x1, double *y1);

/* Fits a view to the scene in a width x height rectangle. */
void hl_render_fit_view (const HlScene *scene, double width, double height,
                         double margin, HlView *view);

/* The same, keeping clear the bands of the frame (side markers, title,
 * scale bars), the caution and, in a wide rectangle, a column for the
 * legend, as `style` asks for them. */
void hl_render_fit_view_framed (const HlScene *scene, const HlRenderStyle *style,
                                double width, double height, double margin,
                                HlView *view);

/* Draws the scene.  `width` and `height` are the drawn area in px, for the
 * side markers, scale bar, legend and message boxes. */
void hl_render_scene (cairo_t *cr, const HlScene *scene, const HlView *view,
                      const HlRenderStyle *style, double width,
                      double height);

/* The scene in two layers, for a view that keeps a picture of the bottom
 * one while the rest moves (a landmark drag that leaves the pelvis where
 * it is):
 *  - HL_RENDER_LAYER_BASE: the background (when the style paints it), the
 *    midline with its label and the pelvis;
 *  - HL_RENDER_LAYER_TOP: everything drawn over them.
 * BASE and then TOP on one target draw exactly what hl_render_scene draws. */
typedef enum {
  HL_RENDER_LAYER_BASE = 1 << 0,
  HL_RENDER_LAYER_TOP = 1 << 1,
  HL_RENDER_LAYERS_ALL = HL_RENDER_LAYER_BASE | HL_RENDER_LAYER_TOP,
} HlRenderLayers;

void hl_render_scene_layers (cairo_t *cr, const HlScene *scene,
                             const HlView *view, const HlRenderStyle *style,
                             double width, double height,
                             HlRenderLayers layers);

/* A digest of everything HL_RENDER_LAYER_BASE draws (view, size, colours,
 * the midline, its label's place, the pelvis outlines): equal keys, equal
 * base layers.  Text is measured with `cr`, the target the layers go to;
 * nothing is drawn.  0 for nothing to draw. */
uint64_t hl_render_scene_base_key (cairo_t *cr, const HlScene *scene,
                                   const HlView *view,
                                   const HlRenderStyle *style, double width,
                                   double height);

/* Draws scene->tmpl, the option's implant template (nothing for a manual
 * option); hl_render_scene calls it.  In hl-render-template.c, with the
 * template's hit test and handles (hl-render-template.h). */
void hl_render_template (cairo_t *cr, const HlScene *scene, const HlView *view,
                         const HlRenderStyle *style);

/* Convenience: builds the scene and draws it. */
void hl_render_schematic (cairo_t *cr, const HlPlan *plan, int option_index,
                          const HlView *view, const HlRenderStyle *style,
                          double width, double height);

/* The placed native landmark whose handle is nearest the screen point
 * (sx, sy) within radius_px, or -1. */
int hl_render_hit_landmark (const HlPlan *plan, const HlView *view,
                            double sx, double sy, double radius_px);

/* Handle radius in px, for hit tests that match what is drawn. */
#define HL_RENDER_HANDLE_RADIUS_PX 5.5

/* ---- Figures ---------------------------------------------------------- */

/* The figure's size limits, px; the figure files are written by
 * hl_figure_save() (render/hl-report.h), through the atomic writer. */
/* The smallest: below 300 px a side the labels, the legend, the scale
 * bars and the caution no longer fit without meeting (test-render checks
 * every box at and above it). */
#define HL_FIGURE_SIZE_MIN 300
#define HL_FIGURE_SIZE_MAX 8192
/* The view a width x height figure of the plan is drawn with (as
 * hl_render_figure_draw fits it): for placing things over a figure and for
 * the tests. */
void hl_render_figure_view (const HlPlan *plan, int option_index, int width,
                            int height, HlRenderPreset preset, HlView *view);
/* Draws the figure of the plan into `cr` as the files get it, recording
 * the layout into `layout` (may be NULL).  With `underlay` (NULL: none;
 * hl_underlay_for_plan) the radiograph lies under the drawing where the
 * plan's calibration puts it, at the figure's scale, with the plan's
 * window, opacity and choice of drawing the schematic bones over it; the
 * forces, labels, templates, frame and caution are drawn over it. */
void hl_render_figure_draw (cairo_t *cr, const HlPlan *plan, int option_index,
                            int width, int height, HlRenderPreset preset,
                            HlUnderlay *underlay, HlRenderLayout *layout);

#ifdef __cplusplus
}
#endif
