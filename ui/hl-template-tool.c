/* hl-template-tool.c: the template's handles on the canvas edit the plan.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#define G_LOG_DOMAIN "hl-template-tool"

#include "config.h"

#include <math.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-render-template.h"
#include "hl-template-shape.h"
#include "hl-template-tool.h"

typedef struct {
  HlDocument *document;     /* borrowed: outlives the canvas */
  int option;               /* the option being dragged, -1 */
  HlTemplate start;         /* its template at the press */
} Tool;

static void
tool_free (gpointer data)
{
  Tool *tool = data;
  g_free (tool);
}

gboolean
hl_template_edit (HlDocument *document, int index, const HlTemplate *tmpl,
                  const char *field)
{
  const HlPlan *plan = hl_document_get_plan (document);
  if (index < 0 || (size_t) index >= plan->n_options)
    return FALSE;
  const HlCatalogue *cat = hl_catalogue_registry_find (tmpl->catalogue);
  HlTemplate t = *tmpl;
  HlError err;
  hl_error_clear (&err);
  t.on = true;
  if (cat == NULL)
    hl_error_set (&err, HL_ERR_INVALID, "catalogue", _("The implant catalogue \"%s\" is not loaded."),
                  tmpl->catalogue);
  else if (hl_template_resolve (&t, cat, &err) == HL_OK)
    hl_template_check (&t, plan->options[index].name, &err);
  if (err.status != HL_OK)
    {
      g_autofree char *text = hl_document_format_error (&err);
      g_signal_emit_by_name (document, "error", _("The template was not changed"), text);
      return FALSE;
    }
  /* In a drag: the drag's one undo step, recorded at its start. */
  HlPlan *edit = hl_document_drag_plan (document);
  gboolean dragging = edit != NULL;
  if (!dragging)
    edit = hl_document_begin_edit (document, field);
  if (edit == NULL)
    return FALSE;
  if (hl_plan_set_template (edit, (size_t) index, &t, cat, &err) != HL_OK)
    g_warning ("template not set: %s", err.message);
  if (dragging)
    hl_document_drag_changed (document, HL_DOCUMENT_CHANGED_VALUES);
  else
    hl_document_end_edit (document, HL_DOCUMENT_CHANGED_VALUES);
  return TRUE;
}

static const HlTemplate *
selected_template (Tool *tool, int *index)
{
  const HlPlan *plan = hl_document_get_plan (tool->document);
  int i = hl_document_get_selected_option (tool->document);
  if (i < 0 || (size_t) i >= plan->n_options || !plan->options[i].recon.tmpl.on)
    return NULL;
  *index = i;
  return &plan->options[i].recon.tmpl;
}

static void
drag_begin_cb (HlCanvas *canvas, int part, Tool *tool)
{
  int index;
  const HlTemplate *t = selected_template (tool, &index);
  tool->option = -1;
  if (t == NULL)
    return;
  tool->option = index;
  tool->start = *t;
  hl_document_begin_drag (tool->document);
}

static void
dragged_cb (HlCanvas *canvas, int part, double fx, double fy, double tx, double ty,
            Tool *tool)
{
  if (tool->option < 0)
    return;
  const HlPlan *plan = hl_document_get_plan (tool->document);
  HlTemplate t = tool->start;
  switch (part)
    {
    case HL_TEMPLATE_PART_CUP:
      t.cup_x_mm = tool->start.cup_x_mm + (tx - fx);
      t.cup_y_mm = tool->start.cup_y_mm + (ty - fy);
      break;
    case HL_TEMPLATE_PART_INCLINATION:
      {
        double incl = hl_template_inclination_towards (
          plan, (HlVec2) { t.cup_x_mm, t.cup_y_mm }, (HlVec2) { tx, ty });
        if (!isfinite (incl))
          return;
        t.inclination_deg = incl;
        break;
      }
    case HL_TEMPLATE_PART_STEM:
      t.seat_mm = hl_template_seat_moved (plan, tool->start.seat_mm, (HlVec2) { fx, fy },
                                          (HlVec2) { tx, ty });
      break;
    default:
      return;
    }
  hl_template_edit (tool->document, tool->option, &t, NULL);
}

static void
drag_end_cb (HlCanvas *canvas, int part, gboolean cancelled, Tool *tool)
{
  if (tool->option < 0)
    return;
  /* Escape: back to the template at the press; the drag's undo step is
   * dropped. */
  if (cancelled)
    hl_template_edit (tool->document, tool->option, &tool->start, NULL);
  hl_document_end_drag (tool->document, cancelled);
  tool->option = -1;
}

static void
nudge_cb (HlCanvas *canvas, int part, double dx, double dy, Tool *tool)
{
  int index;
  const HlTemplate *cur = selected_template (tool, &index);
  if (cur == NULL)
    return;
  const HlPlan *plan = hl_document_get_plan (tool->document);
  HlTemplate t = *cur;
  switch (part)
    {
    case HL_TEMPLATE_PART_CUP:
      t.cup_x_mm += dx;
      t.cup_y_mm += dy;
      break;
    case HL_TEMPLATE_PART_INCLINATION:
      /* Up or right: steeper; the step is the same number in degrees. */
      t.inclination_deg = CLAMP (t.inclination_deg + (dy != 0.0 ? dy : dx),
                                 HL_TEMPLATE_INCLINATION_MIN_DEG,
                                 HL_TEMPLATE_INCLINATION_MAX_DEG);
      break;
    case HL_TEMPLATE_PART_STEM:
      {
        /* Up proximal, down distal (along the shaft axis). */
        double d = dy != 0.0 ? dy : 0.0;
        if (d == 0.0)
          return;
        t.seat_mm = hl_template_seat_step (t.seat_mm, d);
        break;
      }
    default:
      return;
    }
  (void) plan;
  hl_document_break_coalescing (tool->document);
  hl_template_edit (tool->document, index, &t, NULL);
}

static void
step_size_cb (HlCanvas *canvas, int part, int step, Tool *tool)
{
  int index;
  const HlTemplate *cur = selected_template (tool, &index);
  if (cur == NULL)
    return;
  const HlCatalogue *cat = hl_catalogue_registry_find (cur->catalogue);
  HlTemplate t = *cur;
  gboolean moved = part == HL_TEMPLATE_PART_CUP ? hl_template_step_cup (&t, cat, step)
                                                : hl_template_step_stem (&t, cat, step);
  if (!moved)
    {
      gtk_widget_error_bell (GTK_WIDGET (canvas));
      return;
    }
  hl_document_break_coalescing (tool->document);
  hl_template_edit (tool->document, index, &t, NULL);
}

void
hl_template_tool_attach (HlCanvas *canvas, HlDocument *document)
{
  Tool *tool = g_new0 (Tool, 1);
  tool->document = document;
  tool->option = -1;
  g_object_set_data_full (G_OBJECT (canvas), "hl-template-tool", tool, tool_free);
  g_signal_connect (canvas, "template-drag-begin", G_CALLBACK (drag_begin_cb), tool);
  g_signal_connect (canvas, "template-dragged", G_CALLBACK (dragged_cb), tool);
  g_signal_connect (canvas, "template-drag-end", G_CALLBACK (drag_end_cb), tool);
  g_signal_connect (canvas, "template-nudge", G_CALLBACK (nudge_cb), tool);
  g_signal_connect (canvas, "template-step-size", G_CALLBACK (step_size_cb), tool);
}
