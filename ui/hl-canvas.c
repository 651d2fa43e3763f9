/* hl-canvas.c: the schematic widget.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Handles always edit the NATIVE landmarks, also with an option selected:
 * the options move femoral points by their parameters, so what the user
 * places is the native anatomy; the option's moved landmarks are drawn as
 * crosses that cannot be picked (see hl-render.h).
 *
 * The scene (model, result, forces) is solved once per
 * hl_canvas_plan_changed() or option change, never in snapshot.
 *
 * Tab and Shift+Tab step through the placed landmarks; past the last (or
 * first) one the selection clears and focus leaves the canvas as usual, so
 * a keyboard user is never trapped here.
 */
#define G_LOG_DOMAIN "hl-canvas"

#include "config.h"

#include <math.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-canvas.h"
#include "hl-image.h"
#include "hl-render.h"
#include "hl-render-template.h"

/* Keyboard nudges, mm: ui.md. */
#define NUDGE_MM 0.5
#define NUDGE_LARGE_MM 5.0
/* Pick a handle within this many px of its centre: a little more than
 * the drawn radius, for fingers and tremor. */
#define HIT_RADIUS_PX (HL_RENDER_HANDLE_RADIUS_PX + 5.0)
#define ZOOM_STEP 1.2
#define SCROLL_PAN_PX 40.0
#define KEY_PAN_PX 40.0
#define FIT_MARGIN_PX 36.0
#define MIN_WIDTH_PX 240
#define MIN_HEIGHT_PX 200
#define NATURAL_WIDTH_PX 900
#define NATURAL_HEIGHT_PX 650
#define DARK_LUMINANCE 0.5
#define LEGEND_MIN_WIDTH_PX 640
#define LEGEND_MIN_HEIGHT_PX 520

/* What the radiograph under the drawing looks like: while it stays the
 * same (a landmark drag moves neither the view nor the image) the canvas
 * copies its last picture of it instead of resampling the image. */
typedef struct {
  HlUnderlay *underlay;
  HlView view;
  int width, height, scale;
  HlVec2 origin_mm;
  double mm_per_pixel;
  double opacity, brightness, contrast;
  gboolean invert;
  HlRgba bg;
} UnderlayKey;

struct _HlCanvas
{
  GtkWidget parent_instance;

  /* borrowed */
  const HlPlan *plan;
  HlUnderlay *underlay;
  HlDocument *document;     /* its results are drawn: no solve of our own */

  /* owned */
  cairo_surface_t *underlay_cache;  /* background and radiograph, at underlay_key */
  UnderlayKey underlay_key;
  guint underlay_generation;        /* bumped with each new underlay_cache */
  /* The underlay with the scene's base layer over it (hl-render.h:
   * background, midline, pelvis): while a drag leaves that layer as it
   * is, each frame copies this picture and draws only the top layer. */
  cairo_surface_t *base_cache;
  uint64_t base_key;                /* hl_render_scene_base_key of base_cache */
  guint base_under;                 /* underlay_generation in it, 0 for none */
  int base_scale;
  uint64_t last_base_key;           /* the base layer the last frame drew */
  guint last_base_under;
  guint base_reuses;                /* frames drawn over base_cache */
  HlScene scene;
  HlView view;
  gboolean view_fitted;
  gboolean view_moved;      /* zoomed or panned by the user: no refit on resize */
  int last_width, last_height;
  int selected_landmark;
  int hover_landmark;
  int selected_option;
  double pointer_x, pointer_y;
  gboolean pointer_inside;

  /* a drag in progress */
  GtkGesture *drag;
  int drag_landmark;        /* -1: the drag pans */
  gboolean drag_started;    /* landmark-drag-begin emitted */
  gboolean drag_cancelled;
  double drag_x0, drag_y0;  /* press position, px */
  HlVec2 drag_start_mm;     /* the landmark before the drag */
  HlVec2 drag_grab_mm;      /* pointer minus landmark at the press */
  double pan_tx0, pan_ty0;

  HlView zoom_start_view;

  gboolean schematic_hidden;
  gboolean click_placement;

  /* the option's implant template (hl-render-template.h parts) */
  int hover_template;
  int selected_template;
  int drag_template;        /* -1: no template drag */
  HlVec2 drag_template_from;/* the press, plan frame */
};

G_DEFINE_FINAL_TYPE (HlCanvas, hl_canvas, GTK_TYPE_WIDGET)

enum {
  PROP_0,
  PROP_SELECTED_LANDMARK,
  PROP_SELECTED_OPTION,
  PROP_SELECTED_TEMPLATE,
  N_PROPS
};

static GParamSpec *properties[N_PROPS];

enum {
  SIGNAL_LANDMARK_DRAG_BEGIN,
  SIGNAL_LANDMARK_MOVED,
  SIGNAL_LANDMARK_DRAG_END,
  SIGNAL_PLAN_CLICKED,
  SIGNAL_TEMPLATE_DRAG_BEGIN,
  SIGNAL_TEMPLATE_DRAGGED,
  SIGNAL_TEMPLATE_DRAG_END,
  SIGNAL_TEMPLATE_NUDGE,
  SIGNAL_TEMPLATE_STEP_SIZE,
  N_SIGNALS
};

static guint signals[N_SIGNALS];

static void
hl_canvas_update_accessible (HlCanvas *self)
{
  g_autofree char *label = NULL;
  if (self->plan != NULL && self->selected_landmark >= 0
      && hl_landmarks_has (&self->plan->landmarks, self->selected_landmark))
    {
      const HlLandmarkInfo *info = hl_landmark_info (self->selected_landmark);
      HlVec2 p = self->plan->landmarks.p[self->selected_landmark];
      label = g_strdup_printf (_("Schematic. Selected: %s, x %.1f mm, y %.1f mm"),
                               _(info->label), p.x, p.y);
    }
  else if (self->selected_template >= 0 && self->scene.has_template)
    label = g_strdup_printf (_("Schematic. Selected: the template's %s. Arrow keys move it, "
                               "Page Up and Page Down change the size."),
                             hl_template_part_name (self->selected_template));
  else
    label = g_strdup (_("Schematic of the pelvis and both hips. No landmark selected."));

  g_autofree char *description = NULL;
  if (self->scene.solved)
    description = g_strdup_printf (_("Joint reaction force %.2f times body weight; "
                                     "abductor force %.2f times body weight; "
                                     "abductor moment arm %.1f mm."),
                                   self->scene.result.jrf_bw,
                                   self->scene.result.abductor_force_bw,
                                   self->scene.result.abductor_arm_mm);
  else
    description = g_strdup_printf (_("The plan cannot be solved: %s"),
                                   self->scene.error.message);

  gtk_accessible_update_property (GTK_ACCESSIBLE (self),
                                  GTK_ACCESSIBLE_PROPERTY_LABEL, label,
                                  GTK_ACCESSIBLE_PROPERTY_DESCRIPTION, description,
                                  -1);
}

static void
hl_canvas_rebuild (HlCanvas *self)
{
  if (self->document != NULL)
    {
      size_t n;
      const HlSolved *solved = hl_document_get_solved (self->document, &n);
      HlError err;
      const HlModel *model = hl_document_get_model (self->document, &err);
      size_t col = self->selected_option >= 0 ? (size_t) self->selected_option + 1 : 0;

      if (col >= n)
        col = 0;
      hl_scene_build_solved (&self->scene, self->plan, self->selected_option, model,
                             solved[col].status, &solved[col].result,
                             model != NULL ? &solved[col].error : &err);
    }
  else
    hl_scene_build (&self->scene, self->plan, self->selected_option);
  HlVec2 unused;
  if (self->selected_template >= 0
      && (!self->scene.has_template
          || !hl_render_template_handle (&self->scene.tmpl, self->selected_template, &unused)))
    {
      self->selected_template = -1;
      g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_TEMPLATE]);
    }
  if (!self->scene.has_template)
    self->hover_template = -1;
  hl_canvas_update_accessible (self);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void hl_canvas_style (HlCanvas *self, HlRenderStyle *style);

static void
hl_canvas_fit_to (HlCanvas *self, int width, int height)
{
  HlRenderStyle style;
  hl_canvas_style (self, &style);
  hl_render_fit_view_framed (&self->scene, &style, width, height, FIT_MARGIN_PX,
                             &self->view);
  self->view_fitted = TRUE;
}

/* ---- Public API ------------------------------------------------------- */

GtkWidget *
hl_canvas_new (void)
{
  return g_object_new (HL_TYPE_CANVAS, NULL);
}

void
hl_canvas_set_plan (HlCanvas *self, const HlPlan *plan)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  self->plan = plan;
  if (self->selected_option != -1
      && (plan == NULL || (size_t) self->selected_option >= plan->n_options))
    {
      self->selected_option = -1;
      g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_OPTION]);
    }
  if (self->selected_landmark != -1
      && (plan == NULL || !hl_landmarks_has (&plan->landmarks, self->selected_landmark)))
    {
      self->selected_landmark = -1;
      g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_LANDMARK]);
    }
  hl_canvas_rebuild (self);
  /* A new plan is a new picture: fit it now, or at the first allocation. */
  self->view_fitted = FALSE;
  hl_canvas_fit (self);
}

static void
document_changed_cb (HlDocument *document, guint what, HlCanvas *self)
{
  if (what & HL_DOCUMENT_CHANGED_SELECTION)
    {
      int index = hl_document_get_selected_option (document);

      if (index != self->selected_option)
        {
          self->selected_option = index;
          g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_OPTION]);
          what |= HL_DOCUMENT_CHANGED_RESULTS;
        }
    }
  if (what & HL_DOCUMENT_CHANGED_REPLACED)
    hl_canvas_set_plan (self, hl_document_get_plan (document));
  else if (what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_RESULTS))
    hl_canvas_plan_changed (self);
}

void
hl_canvas_set_document (HlCanvas *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  g_return_if_fail (document == NULL || HL_IS_DOCUMENT (document));
  if (self->document != NULL)
    g_signal_handlers_disconnect_by_data (self->document, self);
  self->document = document;
  if (document != NULL)
    g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  self->selected_option = document != NULL ? hl_document_get_selected_option (document) : -1;
  hl_canvas_set_plan (self, document != NULL ? hl_document_get_plan (document) : NULL);
}

void
hl_canvas_plan_changed (HlCanvas *self)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  if (self->plan != NULL && self->selected_option >= 0
      && (size_t) self->selected_option >= self->plan->n_options)
    {
      self->selected_option = -1;
      g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_OPTION]);
    }
  if (self->plan != NULL && self->selected_landmark >= 0
      && !hl_landmarks_has (&self->plan->landmarks, self->selected_landmark))
    {
      self->selected_landmark = -1;
      g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_LANDMARK]);
    }
  hl_canvas_rebuild (self);
}

void
hl_canvas_set_selected_option (HlCanvas *self, int index)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  if (index < 0 || self->plan == NULL || (size_t) index >= self->plan->n_options)
    index = -1;
  if (index == self->selected_option)
    return;
  self->selected_option = index;
  hl_canvas_rebuild (self);
  g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_OPTION]);
}

int
hl_canvas_get_selected_option (HlCanvas *self)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), -1);
  return self->selected_option;
}

void
hl_canvas_set_selected_landmark (HlCanvas *self, int landmark_id)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  if (landmark_id < 0 || landmark_id >= HL_LM_COUNT)
    landmark_id = -1;
  if (landmark_id == self->selected_landmark)
    return;
  self->selected_landmark = landmark_id;
  if (landmark_id >= 0)
    self->selected_template = -1;
  hl_canvas_update_accessible (self);
  gtk_widget_queue_draw (GTK_WIDGET (self));
  g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_LANDMARK]);
}

void
hl_canvas_set_selected_template (HlCanvas *self, int part)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  HlVec2 unused;
  if (part < 0 || !self->scene.has_template
      || !hl_render_template_handle (&self->scene.tmpl, part, &unused))
    part = -1;
  if (part == self->selected_template)
    return;
  self->selected_template = part;
  if (part >= 0)
    hl_canvas_set_selected_landmark (self, -1);
  hl_canvas_update_accessible (self);
  gtk_widget_queue_draw (GTK_WIDGET (self));
  g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SELECTED_TEMPLATE]);
}

int
hl_canvas_get_selected_template (HlCanvas *self)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), -1);
  return self->selected_template;
}

gboolean
hl_canvas_template_handle_to_widget (HlCanvas *self, int part, double *x, double *y)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), FALSE);
  HlVec2 at;
  if (!self->scene.has_template || !hl_render_template_handle (&self->scene.tmpl, part, &at))
    return FALSE;
  return hl_canvas_plan_to_widget (self, at.x, at.y, x, y);
}

int
hl_canvas_get_selected_landmark (HlCanvas *self)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), -1);
  return self->selected_landmark;
}

void
hl_canvas_fit (HlCanvas *self)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  int w = gtk_widget_get_width (GTK_WIDGET (self));
  int h = gtk_widget_get_height (GTK_WIDGET (self));
  if (w <= 0 || h <= 0)
    {
      self->view_fitted = FALSE;
      return;
    }
  self->view_moved = FALSE;
  hl_canvas_fit_to (self, w, h);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

gboolean
hl_canvas_plan_to_widget (HlCanvas *self, double x_mm, double y_mm,
                          double *x, double *y)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), FALSE);
  if (!self->view_fitted || gtk_widget_get_width (GTK_WIDGET (self)) <= 0)
    return FALSE;
  HlVec2 s = hl_view_to_screen (&self->view, (HlVec2) { x_mm, y_mm });
  if (x != NULL)
    *x = s.x;
  if (y != NULL)
    *y = s.y;
  return TRUE;
}

static void
hl_canvas_zoom_about (HlCanvas *self, double factor, double sx, double sy)
{
  hl_view_zoom_about (&self->view, factor, sx, sy);
  self->view_moved = TRUE;
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

void
hl_canvas_zoom_by (HlCanvas *self, double factor)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  hl_canvas_zoom_about (self, factor, 0.5 * gtk_widget_get_width (GTK_WIDGET (self)),
                        0.5 * gtk_widget_get_height (GTK_WIDGET (self)));
}

void
hl_canvas_set_underlay (HlCanvas *self, HlUnderlay *underlay)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  self->underlay = underlay;
  /* Another image may come at the address of one freed. */
  g_clear_pointer (&self->underlay_cache, cairo_surface_destroy);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

void
hl_canvas_set_schematic_visible (HlCanvas *self, gboolean visible)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  self->schematic_hidden = !visible;
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void hl_canvas_update_cursor (HlCanvas *self);

void
hl_canvas_set_click_placement (HlCanvas *self, gboolean enabled)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  self->click_placement = enabled;
  hl_canvas_update_cursor (self);
}

gboolean
hl_canvas_get_click_placement (HlCanvas *self)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), FALSE);
  return self->click_placement;
}

void
hl_canvas_pan_by (HlCanvas *self, double dx, double dy)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  self->view.tx += dx;
  self->view.ty += dy;
  self->view_moved = TRUE;
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

void
hl_canvas_get_view (HlCanvas *self, double *scale, double *tx, double *ty)
{
  g_return_if_fail (HL_IS_CANVAS (self));
  *scale = self->view.scale;
  *tx = self->view.tx;
  *ty = self->view.ty;
}

guint
hl_canvas_get_base_reuses (HlCanvas *self)
{
  g_return_val_if_fail (HL_IS_CANVAS (self), 0);
  return self->base_reuses;
}

/* ---- Hover and drag ---------------------------------------------------- */

static int
hl_canvas_hit (HlCanvas *self, double x, double y)
{
  if (self->click_placement)
    return -1;
  return hl_render_hit_landmark (self->plan, &self->view, x, y, HIT_RADIUS_PX);
}

static int
hl_canvas_hit_template (HlCanvas *self, double x, double y)
{
  if (self->click_placement || !self->scene.has_template)
    return -1;
  return hl_render_hit_template (&self->scene.tmpl, &self->view, x, y, HIT_RADIUS_PX);
}

static void
hl_canvas_update_cursor (HlCanvas *self)
{
  const char *name = NULL;
  if (self->click_placement)
    name = "crosshair";
  else if ((self->drag_landmark >= 0 || self->drag_template >= 0) && self->drag_started)
    name = "grabbing";
  else if (self->hover_landmark >= 0 || self->hover_template >= 0)
    name = "grab";
  gtk_widget_set_cursor_from_name (GTK_WIDGET (self), name);
}

static void
hl_canvas_set_hover (HlCanvas *self, int id)
{
  if (id == self->hover_landmark)
    return;
  self->hover_landmark = id;
  hl_canvas_update_cursor (self);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void
motion_cb (GtkEventControllerMotion *controller, double x, double y,
           HlCanvas *self)
{
  self->pointer_x = x;
  self->pointer_y = y;
  self->pointer_inside = TRUE;
  if ((self->drag_landmark < 0 && self->drag_template < 0) || !self->drag_started)
    {
      int lm = hl_canvas_hit (self, x, y);
      int part = lm < 0 ? hl_canvas_hit_template (self, x, y) : -1;
      if (part != self->hover_template)
        {
          self->hover_template = part;
          gtk_widget_queue_draw (GTK_WIDGET (self));
        }
      hl_canvas_set_hover (self, lm);
      hl_canvas_update_cursor (self);
    }
}

static void
leave_cb (GtkEventControllerMotion *controller, HlCanvas *self)
{
  self->pointer_inside = FALSE;
  if (self->drag_landmark < 0)
    hl_canvas_set_hover (self, -1);
  if (self->drag_template < 0 && self->hover_template >= 0)
    {
      self->hover_template = -1;
      gtk_widget_queue_draw (GTK_WIDGET (self));
    }
}

static void
drag_begin_cb (GtkGestureDrag *gesture, double x, double y, HlCanvas *self)
{
  gtk_widget_grab_focus (GTK_WIDGET (self));
  self->drag_x0 = x;
  self->drag_y0 = y;
  self->drag_started = FALSE;
  self->drag_cancelled = FALSE;
  self->drag_landmark = hl_canvas_hit (self, x, y);
  self->pan_tx0 = self->view.tx;
  self->pan_ty0 = self->view.ty;
  if (self->drag_landmark >= 0)
    {
      HlVec2 p = self->plan->landmarks.p[self->drag_landmark];
      HlVec2 at = hl_view_to_plan (&self->view, (HlVec2) { x, y });
      self->drag_start_mm = p;
      self->drag_grab_mm = (HlVec2) { at.x - p.x, at.y - p.y };
      hl_canvas_set_selected_landmark (self, self->drag_landmark);
    }
  else
    {
      self->drag_template = hl_canvas_hit_template (self, x, y);
      if (self->drag_template >= 0)
        {
          self->drag_template_from = hl_view_to_plan (&self->view, (HlVec2) { x, y });
          hl_canvas_set_selected_template (self, self->drag_template);
        }
    }
}

static void
drag_update_cb (GtkGestureDrag *gesture, double dx, double dy, HlCanvas *self)
{
  if (self->drag_cancelled)
    return;
  if (self->drag_template >= 0)
    {
      if (!self->drag_started)
        {
          if (dx == 0.0 && dy == 0.0)
            return;
          self->drag_started = TRUE;
          hl_canvas_update_cursor (self);
          g_signal_emit (self, signals[SIGNAL_TEMPLATE_DRAG_BEGIN], 0, self->drag_template);
        }
      HlVec2 to = hl_view_to_plan (&self->view,
                                   (HlVec2) { self->drag_x0 + dx, self->drag_y0 + dy });
      g_signal_emit (self, signals[SIGNAL_TEMPLATE_DRAGGED], 0, self->drag_template,
                     self->drag_template_from.x, self->drag_template_from.y, to.x, to.y);
      return;
    }
  if (self->drag_landmark < 0)
    {
      self->view.tx = self->pan_tx0 + dx;
      self->view.ty = self->pan_ty0 + dy;
      self->view_moved = TRUE;
      gtk_widget_queue_draw (GTK_WIDGET (self));
      return;
    }
  if (!self->drag_started)
    {
      if (dx == 0.0 && dy == 0.0)
        return;
      self->drag_started = TRUE;
      hl_canvas_update_cursor (self);
      g_signal_emit (self, signals[SIGNAL_LANDMARK_DRAG_BEGIN], 0, self->drag_landmark);
    }
  HlVec2 at = hl_view_to_plan (&self->view,
                               (HlVec2) { self->drag_x0 + dx, self->drag_y0 + dy });
  g_signal_emit (self, signals[SIGNAL_LANDMARK_MOVED], 0, self->drag_landmark,
                 at.x - self->drag_grab_mm.x, at.y - self->drag_grab_mm.y);
}

static void
drag_end_cb (GtkGestureDrag *gesture, double dx, double dy, HlCanvas *self)
{
  int id = self->drag_landmark;
  gboolean started = self->drag_started;
  int part = self->drag_template;
  self->drag_template = -1;
  if (part >= 0 && started && !self->drag_cancelled)
    g_signal_emit (self, signals[SIGNAL_TEMPLATE_DRAG_END], 0, part, FALSE);
  self->drag_landmark = -1;
  self->drag_started = FALSE;
  if (id >= 0 && started && !self->drag_cancelled)
    g_signal_emit (self, signals[SIGNAL_LANDMARK_DRAG_END], 0, id, FALSE);
  self->drag_cancelled = FALSE;
  hl_canvas_update_cursor (self);
}

/* Escape: put the landmark back where it was and end the drag. */
static gboolean
hl_canvas_cancel_drag (HlCanvas *self)
{
  if (self->drag_template >= 0 && self->drag_started && !self->drag_cancelled)
    {
      self->drag_cancelled = TRUE;
      g_signal_emit (self, signals[SIGNAL_TEMPLATE_DRAG_END], 0, self->drag_template, TRUE);
      gtk_gesture_set_state (self->drag, GTK_EVENT_SEQUENCE_DENIED);
      return TRUE;
    }
  if (self->drag_landmark < 0 || !self->drag_started || self->drag_cancelled)
    {
      if (self->drag_landmark < 0 && gtk_gesture_is_active (self->drag))
        {
          self->view.tx = self->pan_tx0;
          self->view.ty = self->pan_ty0;
          self->drag_cancelled = TRUE;
          gtk_gesture_set_state (self->drag, GTK_EVENT_SEQUENCE_DENIED);
          gtk_widget_queue_draw (GTK_WIDGET (self));
          return TRUE;
        }
      return FALSE;
    }
  int id = self->drag_landmark;
  self->drag_cancelled = TRUE;
  g_signal_emit (self, signals[SIGNAL_LANDMARK_MOVED], 0, id,
                 self->drag_start_mm.x, self->drag_start_mm.y);
  g_signal_emit (self, signals[SIGNAL_LANDMARK_DRAG_END], 0, id, TRUE);
  gtk_gesture_set_state (self->drag, GTK_EVENT_SEQUENCE_DENIED);
  return TRUE;
}

static void
click_released_cb (GtkGestureClick *gesture, int n_press, double x, double y,
                   HlCanvas *self)
{
  if (self->click_placement)
    {
      HlVec2 at = hl_view_to_plan (&self->view, (HlVec2) { x, y });
      g_signal_emit (self, signals[SIGNAL_PLAN_CLICKED], 0, at.x, at.y);
      return;
    }
  if (hl_canvas_hit (self, x, y) < 0)
    hl_canvas_set_selected_landmark (self, -1);
  if (hl_canvas_hit (self, x, y) >= 0 || hl_canvas_hit_template (self, x, y) < 0)
    hl_canvas_set_selected_template (self, -1);
}

/* ---- Scroll and pinch --------------------------------------------------- */

static gboolean
scroll_cb (GtkEventControllerScroll *controller, double dx, double dy,
           HlCanvas *self)
{
  GdkModifierType state = gtk_event_controller_get_current_event_state (
    GTK_EVENT_CONTROLLER (controller));
  if (state & GDK_CONTROL_MASK)
    {
      double sx = self->pointer_inside ? self->pointer_x
                                       : 0.5 * gtk_widget_get_width (GTK_WIDGET (self));
      double sy = self->pointer_inside ? self->pointer_y
                                       : 0.5 * gtk_widget_get_height (GTK_WIDGET (self));
      hl_canvas_zoom_about (self, pow (ZOOM_STEP, -dy), sx, sy);
      return TRUE;
    }
  if (state & GDK_SHIFT_MASK)
    self->view.tx -= (dy + dx) * SCROLL_PAN_PX;
  else
    {
      self->view.tx -= dx * SCROLL_PAN_PX;
      self->view.ty -= dy * SCROLL_PAN_PX;
    }
  gtk_widget_queue_draw (GTK_WIDGET (self));
  return TRUE;
}

static void
zoom_begin_cb (GtkGesture *gesture, GdkEventSequence *sequence, HlCanvas *self)
{
  self->zoom_start_view = self->view;
}

static void
zoom_scale_changed_cb (GtkGestureZoom *gesture, double scale, HlCanvas *self)
{
  double cx, cy;
  if (!gtk_gesture_get_bounding_box_center (GTK_GESTURE (gesture), &cx, &cy))
    {
      cx = 0.5 * gtk_widget_get_width (GTK_WIDGET (self));
      cy = 0.5 * gtk_widget_get_height (GTK_WIDGET (self));
    }
  self->view = self->zoom_start_view;
  hl_canvas_zoom_about (self, scale, cx, cy);
}

/* ---- Keyboard ------------------------------------------------------------ */

static void
hl_canvas_nudge (HlCanvas *self, double dx, double dy)
{
  int id = self->selected_landmark;
  HlVec2 p = self->plan->landmarks.p[id];
  g_signal_emit (self, signals[SIGNAL_LANDMARK_DRAG_BEGIN], 0, id);
  g_signal_emit (self, signals[SIGNAL_LANDMARK_MOVED], 0, id, p.x + dx, p.y + dy);
  g_signal_emit (self, signals[SIGNAL_LANDMARK_DRAG_END], 0, id, FALSE);
}

/* The next placed landmark after `from` in `step` direction, or -1 past
 * the end. */
static int
hl_canvas_cycle (HlCanvas *self, int from, int step)
{
  if (self->plan == NULL)
    return -1;
  /* Positions 0 .. HL_LM_COUNT - 1 are the landmarks, then the template's
   * handles (cup, inclination, stem). */
  const int n = HL_LM_COUNT + HL_TEMPLATE_PART_N;
  int i = from < 0 ? (step > 0 ? -1 : n) : from;
  for (i += step; i >= 0 && i < n; i += step)
    {
      HlVec2 unused;
      if (i < HL_LM_COUNT ? hl_landmarks_has (&self->plan->landmarks, i)
                          : self->scene.has_template
                              && hl_render_template_handle (&self->scene.tmpl,
                                                            i - HL_LM_COUNT, &unused))
        return i;
    }
  return -1;
}

static gboolean
key_pressed_cb (GtkEventControllerKey *controller, guint keyval, guint keycode,
                GdkModifierType state, HlCanvas *self)
{
  gboolean shift = (state & GDK_SHIFT_MASK) != 0;
  gboolean has_sel = self->plan != NULL && self->selected_landmark >= 0
    && hl_landmarks_has (&self->plan->landmarks, self->selected_landmark);
  double step = shift ? NUDGE_LARGE_MM : NUDGE_MM;
  double dx = 0.0, dy = 0.0;

  if (state & (GDK_CONTROL_MASK | GDK_ALT_MASK))
    return FALSE;

  switch (keyval)
    {
    case GDK_KEY_Escape:
      return hl_canvas_cancel_drag (self);
    case GDK_KEY_Left:
    case GDK_KEY_KP_Left:
      dx = -1.0;
      break;
    case GDK_KEY_Right:
    case GDK_KEY_KP_Right:
      dx = 1.0;
      break;
    case GDK_KEY_Up:
    case GDK_KEY_KP_Up:
      dy = 1.0;
      break;
    case GDK_KEY_Down:
    case GDK_KEY_KP_Down:
      dy = -1.0;
      break;
    case GDK_KEY_Tab:
    case GDK_KEY_KP_Tab:
    case GDK_KEY_ISO_Left_Tab:
      {
        int step_dir = (shift || keyval == GDK_KEY_ISO_Left_Tab) ? -1 : 1;
        int from = self->selected_template >= 0 ? HL_LM_COUNT + self->selected_template
                                                : self->selected_landmark;
        int next = hl_canvas_cycle (self, from, step_dir);
        hl_canvas_set_selected_landmark (self, next < HL_LM_COUNT ? next : -1);
        hl_canvas_set_selected_template (self, next >= HL_LM_COUNT ? next - HL_LM_COUNT : -1);
        return next >= 0;
      }
    case GDK_KEY_Page_Up:
    case GDK_KEY_KP_Page_Up:
    case GDK_KEY_Page_Down:
    case GDK_KEY_KP_Page_Down:
      if (self->selected_template != HL_TEMPLATE_PART_CUP
          && self->selected_template != HL_TEMPLATE_PART_STEM)
        return FALSE;
      g_signal_emit (self, signals[SIGNAL_TEMPLATE_STEP_SIZE], 0, self->selected_template,
                     (keyval == GDK_KEY_Page_Up || keyval == GDK_KEY_KP_Page_Up) ? 1 : -1);
      return TRUE;
    case GDK_KEY_plus:
    case GDK_KEY_equal:
    case GDK_KEY_KP_Add:
      hl_canvas_zoom_by (self, ZOOM_STEP);
      return TRUE;
    case GDK_KEY_minus:
    case GDK_KEY_KP_Subtract:
      hl_canvas_zoom_by (self, 1.0 / ZOOM_STEP);
      return TRUE;
    case GDK_KEY_0:
    case GDK_KEY_KP_0:
    case GDK_KEY_Home:
    case GDK_KEY_KP_Home:
      hl_canvas_fit (self);
      return TRUE;
    default:
      return FALSE;
    }

  if ((self->drag_landmark >= 0 || self->drag_template >= 0) && self->drag_started)
    return TRUE;
  if (self->selected_template >= 0)
    g_signal_emit (self, signals[SIGNAL_TEMPLATE_NUDGE], 0, self->selected_template,
                   dx * step, dy * step);
  else if (has_sel)
    hl_canvas_nudge (self, dx * step, dy * step);
  else
    {
      /* Nothing selected: the arrows pan, as in any viewer. */
      self->view.tx -= dx * KEY_PAN_PX;
      self->view.ty += dy * KEY_PAN_PX;
      gtk_widget_queue_draw (GTK_WIDGET (self));
    }
  return TRUE;
}

/* ---- GtkWidget ------------------------------------------------------------ */

static void
hl_canvas_style (HlCanvas *self, HlRenderStyle *style)
{
  GtkStyleContext *ctx = gtk_widget_get_style_context (GTK_WIDGET (self));
  GdkRGBA fg;
  gtk_style_context_get_color (ctx, &fg);
  double lum = 0.2126 * fg.red + 0.7152 * fg.green + 0.0722 * fg.blue;
  gboolean dark = lum > DARK_LUMINANCE;
  hl_render_style_init (style, dark);
  style->fg = (HlRgba) { fg.red, fg.green, fg.blue, 1.0 };
  GdkRGBA bg;
  if (gtk_style_context_lookup_color (ctx, "theme_base_color", &bg)
      || gtk_style_context_lookup_color (ctx, "view_bg_color", &bg))
    style->bg = (HlRgba) { bg.red, bg.green, bg.blue, 1.0 };
  style->paint_background = TRUE;
  /* In a small canvas the legend would hide the bones; the arrows carry
   * their names anyway. */
  style->show_legend = gtk_widget_get_width (GTK_WIDGET (self)) >= LEGEND_MIN_WIDTH_PX
                       && gtk_widget_get_height (GTK_WIDGET (self)) >= LEGEND_MIN_HEIGHT_PX;
  style->hover_landmark = self->hover_landmark;
  style->selected_landmark = self->selected_landmark;
  style->hover_template = self->hover_template;
  style->selected_template = self->selected_template;
}

/* The background and the radiograph as the view shows them, drawn again
 * only when something of them changed. */
static cairo_surface_t *
hl_canvas_underlay_picture (HlCanvas *self, const HlRenderStyle *style,
                            const HlImagePlacement *placement, int width, int height)
{
  const HlRadiograph *rg = &self->plan->radiograph;
  int scale = gtk_widget_get_scale_factor (GTK_WIDGET (self));
  UnderlayKey key;
  cairo_t *cr;

  memset (&key, 0, sizeof key);
  key.underlay = self->underlay;
  key.view = self->view;
  key.width = width;
  key.height = height;
  key.scale = scale;
  key.origin_mm = placement->origin_mm;
  key.mm_per_pixel = placement->mm_per_pixel;
  key.opacity = rg->opacity;
  key.brightness = rg->brightness;
  key.contrast = rg->contrast;
  key.invert = rg->invert;
  key.bg = style->bg;
  if (self->underlay_cache != NULL && memcmp (&key, &self->underlay_key, sizeof key) == 0)
    return self->underlay_cache;

  g_clear_pointer (&self->underlay_cache, cairo_surface_destroy);
  self->underlay_cache = cairo_image_surface_create (CAIRO_FORMAT_RGB24, width * scale,
                                                     height * scale);
  cairo_surface_set_device_scale (self->underlay_cache, scale, scale);
  cr = cairo_create (self->underlay_cache);
  cairo_set_source_rgb (cr, style->bg.r, style->bg.g, style->bg.b);
  cairo_paint (cr);
  hl_underlay_draw (self->underlay, cr, &self->view, placement->origin_mm,
                    placement->mm_per_pixel, rg->opacity);
  cairo_destroy (cr);
  self->underlay_key = key;
  if (++self->underlay_generation == 0)
    self->underlay_generation = 1;
  return self->underlay_cache;
}

/* The picture under the top layer: `under` (the radiograph, or NULL)
 * with the base layer drawn over it.  Both go into a recording, as on the
 * canvas's own node, and the recording is replayed into the picture: so
 * copying the picture gives the very pixels that drawing would (text
 * included, at any scale). */
static cairo_surface_t *
hl_canvas_base_picture (HlCanvas *self, cairo_t *target, const HlRenderStyle *style,
                        cairo_surface_t *under, int width, int height, int scale)
{
  cairo_surface_t *rec, *picture;
  cairo_font_options_t *fonts = cairo_font_options_create ();
  cairo_t *cr;

  rec = cairo_recording_surface_create (CAIRO_CONTENT_COLOR_ALPHA,
                                        &(cairo_rectangle_t) { 0, 0, width, height });
  cr = cairo_create (rec);
  cairo_get_font_options (target, fonts);
  cairo_set_font_options (cr, fonts);
  cairo_font_options_destroy (fonts);
  cairo_set_antialias (cr, cairo_get_antialias (target));
  if (under != NULL)
    {
      cairo_set_source_surface (cr, under, 0, 0);
      cairo_paint (cr);
    }
  hl_render_scene_layers (cr, &self->scene, &self->view, style, width, height,
                          HL_RENDER_LAYER_BASE);
  cairo_destroy (cr);
  picture = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, width * scale, height * scale);
  cairo_surface_set_device_scale (picture, scale, scale);
  cr = cairo_create (picture);
  cairo_set_source_surface (cr, rec, 0, 0);
  cairo_paint (cr);
  cairo_destroy (cr);
  cairo_surface_destroy (rec);
  return picture;
}

static void
hl_canvas_snapshot (GtkWidget *widget, GtkSnapshot *snapshot)
{
  HlCanvas *self = HL_CANVAS (widget);
  int width = gtk_widget_get_width (widget);
  int height = gtk_widget_get_height (widget);
  if (width <= 0 || height <= 0)
    return;
  if (!self->view_fitted)
    hl_canvas_fit_to (self, width, height);

  HlRenderStyle style;
  hl_canvas_style (self, &style);
  cairo_t *cr = gtk_snapshot_append_cairo (snapshot,
                                           &GRAPHENE_RECT_INIT (0, 0, width, height));
  HlImagePlacement placement;
  cairo_surface_t *under = NULL;
  guint under_generation = 0;
  int scale = gtk_widget_get_scale_factor (widget);
  if (self->underlay != NULL && self->plan != NULL
      && hl_image_placement (self->plan, &placement, NULL) == HL_OK)
    {
      under = hl_canvas_underlay_picture (self, &style, &placement, width, height);
      under_generation = self->underlay_generation;
      style.paint_background = FALSE;
      /* The title, side words, scale bar and force scale readable over
       * the image, as in the figure and the report. */
      style.text_backing = TRUE;
    }
  style.hide_schematic = self->schematic_hidden;

  /* The base layer as a picture once it stays the same for two frames (a
   * drag of anything but the pelvis); while it changes every frame, drawn
   * directly. */
  uint64_t key = hl_render_scene_base_key (cr, &self->scene, &self->view, &style,
                                           width, height);
  gboolean same = key != 0 && key == self->last_base_key
                  && under_generation == self->last_base_under;
  self->last_base_key = key;
  self->last_base_under = under_generation;
  if (same && (self->base_cache == NULL || self->base_key != key
               || self->base_under != under_generation || self->base_scale != scale))
    {
      g_clear_pointer (&self->base_cache, cairo_surface_destroy);
      self->base_cache = hl_canvas_base_picture (self, cr, &style, under, width, height, scale);
      self->base_key = key;
      self->base_under = under_generation;
      self->base_scale = scale;
    }
  if (same)
    {
      self->base_reuses++;
      cairo_set_source_surface (cr, self->base_cache, 0, 0);
      cairo_paint (cr);
      hl_render_scene_layers (cr, &self->scene, &self->view, &style, width, height,
                              HL_RENDER_LAYER_TOP);
    }
  else
    {
      if (under != NULL)
        {
          cairo_set_source_surface (cr, under, 0, 0);
          cairo_paint (cr);
        }
      hl_render_scene (cr, &self->scene, &self->view, &style, width, height);
    }
  cairo_destroy (cr);
}

static void
hl_canvas_size_allocate (GtkWidget *widget, int width, int height, int baseline)
{
  HlCanvas *self = HL_CANVAS (widget);
  /* Until the user zooms or pans, the drawing refits to every new size;
   * after that the middle of the drawing stays in the middle. */
  if (!self->view_fitted || (!self->view_moved && (width != self->last_width
                                                   || height != self->last_height)))
    hl_canvas_fit_to (self, width, height);
  else if (self->last_width > 0 && self->last_height > 0)
    {
      /* Keep the middle of the drawing in the middle. */
      self->view.tx += 0.5 * (width - self->last_width);
      self->view.ty += 0.5 * (height - self->last_height);
    }
  self->last_width = width;
  self->last_height = height;
}

static void
hl_canvas_measure (GtkWidget *widget, GtkOrientation orientation, int for_size,
                   int *minimum, int *natural, int *minimum_baseline,
                   int *natural_baseline)
{
  gboolean horizontal = orientation == GTK_ORIENTATION_HORIZONTAL;
  *minimum = horizontal ? MIN_WIDTH_PX : MIN_HEIGHT_PX;
  *natural = horizontal ? NATURAL_WIDTH_PX : NATURAL_HEIGHT_PX;
}

static void
hl_canvas_css_changed (GtkWidget *widget, GtkCssStyleChange *change)
{
  GTK_WIDGET_CLASS (hl_canvas_parent_class)->css_changed (widget, change);
  gtk_widget_queue_draw (widget);
}

static void
hl_canvas_get_property (GObject *object, guint prop_id, GValue *value,
                        GParamSpec *pspec)
{
  HlCanvas *self = HL_CANVAS (object);
  switch (prop_id)
    {
    case PROP_SELECTED_LANDMARK:
      g_value_set_int (value, self->selected_landmark);
      break;
    case PROP_SELECTED_OPTION:
      g_value_set_int (value, self->selected_option);
      break;
    case PROP_SELECTED_TEMPLATE:
      g_value_set_int (value, self->selected_template);
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, prop_id, pspec);
    }
}

static void
hl_canvas_set_property (GObject *object, guint prop_id, const GValue *value,
                        GParamSpec *pspec)
{
  HlCanvas *self = HL_CANVAS (object);
  switch (prop_id)
    {
    case PROP_SELECTED_LANDMARK:
      hl_canvas_set_selected_landmark (self, g_value_get_int (value));
      break;
    case PROP_SELECTED_OPTION:
      hl_canvas_set_selected_option (self, g_value_get_int (value));
      break;
    case PROP_SELECTED_TEMPLATE:
      hl_canvas_set_selected_template (self, g_value_get_int (value));
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, prop_id, pspec);
    }
}

static void
hl_canvas_finalize (GObject *object)
{
  HlCanvas *self = HL_CANVAS (object);

  g_clear_pointer (&self->underlay_cache, cairo_surface_destroy);
  g_clear_pointer (&self->base_cache, cairo_surface_destroy);
  G_OBJECT_CLASS (hl_canvas_parent_class)->finalize (object);
}

static void
hl_canvas_class_init (HlCanvasClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->finalize = hl_canvas_finalize;
  object_class->get_property = hl_canvas_get_property;
  object_class->set_property = hl_canvas_set_property;

  widget_class->snapshot = hl_canvas_snapshot;
  widget_class->size_allocate = hl_canvas_size_allocate;
  widget_class->measure = hl_canvas_measure;
  widget_class->css_changed = hl_canvas_css_changed;

  properties[PROP_SELECTED_LANDMARK] =
    g_param_spec_int ("selected-landmark", NULL, NULL, -1, HL_LM_COUNT - 1, -1,
                      G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  properties[PROP_SELECTED_OPTION] =
    g_param_spec_int ("selected-option", NULL, NULL, -1, G_MAXINT, -1,
                      G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  properties[PROP_SELECTED_TEMPLATE] =
    g_param_spec_int ("selected-template", NULL, NULL, -1, HL_TEMPLATE_PART_N - 1, -1,
                      G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, properties);

  signals[SIGNAL_LANDMARK_DRAG_BEGIN] =
    g_signal_new ("landmark-drag-begin", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 1, G_TYPE_INT);
  signals[SIGNAL_LANDMARK_MOVED] =
    g_signal_new ("landmark-moved", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 3, G_TYPE_INT, G_TYPE_DOUBLE,
                  G_TYPE_DOUBLE);
  signals[SIGNAL_LANDMARK_DRAG_END] =
    g_signal_new ("landmark-drag-end", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 2, G_TYPE_INT, G_TYPE_BOOLEAN);
  signals[SIGNAL_TEMPLATE_DRAG_BEGIN] =
    g_signal_new ("template-drag-begin", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 1, G_TYPE_INT);
  signals[SIGNAL_TEMPLATE_DRAGGED] =
    g_signal_new ("template-dragged", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 5, G_TYPE_INT, G_TYPE_DOUBLE,
                  G_TYPE_DOUBLE, G_TYPE_DOUBLE, G_TYPE_DOUBLE);
  signals[SIGNAL_TEMPLATE_DRAG_END] =
    g_signal_new ("template-drag-end", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 2, G_TYPE_INT, G_TYPE_BOOLEAN);
  signals[SIGNAL_TEMPLATE_NUDGE] =
    g_signal_new ("template-nudge", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 3, G_TYPE_INT, G_TYPE_DOUBLE,
                  G_TYPE_DOUBLE);
  signals[SIGNAL_TEMPLATE_STEP_SIZE] =
    g_signal_new ("template-step-size", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 2, G_TYPE_INT, G_TYPE_INT);
  signals[SIGNAL_PLAN_CLICKED] =
    g_signal_new ("plan-clicked", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 2, G_TYPE_DOUBLE, G_TYPE_DOUBLE);

  gtk_widget_class_set_css_name (widget_class, "hl-canvas");
  gtk_widget_class_set_accessible_role (widget_class, GTK_ACCESSIBLE_ROLE_GROUP);
}

static void
hl_canvas_init (HlCanvas *self)
{
  GtkWidget *widget = GTK_WIDGET (self);
  self->selected_landmark = -1;
  self->hover_landmark = -1;
  self->selected_option = -1;
  self->drag_landmark = -1;
  self->hover_template = -1;
  self->selected_template = -1;
  self->drag_template = -1;
  self->view = (HlView) { 1.0, 0.0, 0.0 };
  hl_scene_build (&self->scene, NULL, -1);

  gtk_widget_set_focusable (widget, TRUE);
  gtk_widget_set_focus_on_click (widget, TRUE);
  gtk_widget_set_hexpand (widget, TRUE);
  gtk_widget_set_vexpand (widget, TRUE);
  gtk_widget_set_overflow (widget, GTK_OVERFLOW_HIDDEN);

  GtkGesture *drag = gtk_gesture_drag_new ();
  gtk_gesture_single_set_button (GTK_GESTURE_SINGLE (drag), GDK_BUTTON_PRIMARY);
  g_signal_connect (drag, "drag-begin", G_CALLBACK (drag_begin_cb), self);
  g_signal_connect (drag, "drag-update", G_CALLBACK (drag_update_cb), self);
  g_signal_connect (drag, "drag-end", G_CALLBACK (drag_end_cb), self);
  gtk_widget_add_controller (widget, GTK_EVENT_CONTROLLER (drag));
  self->drag = drag;

  GtkGesture *click = gtk_gesture_click_new ();
  gtk_gesture_single_set_button (GTK_GESTURE_SINGLE (click), GDK_BUTTON_PRIMARY);
  g_signal_connect (click, "released", G_CALLBACK (click_released_cb), self);
  gtk_widget_add_controller (widget, GTK_EVENT_CONTROLLER (click));

  GtkEventController *motion = gtk_event_controller_motion_new ();
  g_signal_connect (motion, "motion", G_CALLBACK (motion_cb), self);
  g_signal_connect (motion, "leave", G_CALLBACK (leave_cb), self);
  gtk_widget_add_controller (widget, motion);

  GtkEventController *scroll =
    gtk_event_controller_scroll_new (GTK_EVENT_CONTROLLER_SCROLL_BOTH_AXES);
  g_signal_connect (scroll, "scroll", G_CALLBACK (scroll_cb), self);
  gtk_widget_add_controller (widget, scroll);

  GtkGesture *zoom = gtk_gesture_zoom_new ();
  g_signal_connect (zoom, "begin", G_CALLBACK (zoom_begin_cb), self);
  g_signal_connect (zoom, "scale-changed", G_CALLBACK (zoom_scale_changed_cb), self);
  gtk_widget_add_controller (widget, GTK_EVENT_CONTROLLER (zoom));

  GtkEventController *key = gtk_event_controller_key_new ();
  g_signal_connect (key, "key-pressed", G_CALLBACK (key_pressed_cb), self);
  gtk_widget_add_controller (widget, key);

  hl_canvas_update_accessible (self);
}
