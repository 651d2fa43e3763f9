/* hl-ui-util.c: small pieces the side panel's pages share (hl-ui-util.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-ui-util"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "hl-ui-util.h"

void
hl_ui_print_widget (const char *name, GtkWidget *widget)
{
  GtkNative *native = gtk_widget_get_native (widget);
  graphene_point_t in = GRAPHENE_POINT_INIT (gtk_widget_get_width (widget) / 2.0f,
                                             gtk_widget_get_height (widget) / 2.0f);
  graphene_point_t out;
  double tx, ty;

  if (native == NULL || !gtk_widget_get_mapped (widget)
      || !gtk_widget_compute_point (widget, GTK_WIDGET (native), &in, &out))
    return;
  gtk_native_get_surface_transform (native, &tx, &ty);
  printf ("WIDGET %s %.0f %.0f\n", name, out.x + tx, out.y + ty);
}

void
hl_ui_set_spin (GtkSpinButton *spin, double value)
{
  if (isfinite (value) && gtk_spin_button_get_value (spin) != value)
    gtk_spin_button_set_value (spin, value);
}

/* The most digits a spin button shows (GTK's own limit). */
#define HL_SPIN_MAX_DIGITS 20

void
hl_ui_spin_set_range (GtkSpinButton *spin, double lower, double upper, double step)
{
  int digits = 0;

  if (fabs (step) < 1.0 && step != 0.0)
    digits = MIN (abs ((int) floor (log10 (fabs (step)))), HL_SPIN_MAX_DIGITS);
  gtk_spin_button_configure (spin, gtk_adjustment_new (lower, lower, upper, step, 10.0 * step, 0.0),
                             step, (guint) digits);
  gtk_spin_button_set_numeric (spin, TRUE);
}

HlPlan *
hl_page_link_begin_edit (HlPageLink *link, const char *field)
{
  if (link->syncing > 0 || link->document == NULL)
    return NULL;
  if (field == NULL)
    hl_document_break_coalescing (link->document);
  return hl_document_begin_edit (link->document, field);
}

/* ---- spin buttons bound to the plan ----------------------------------- */

GtkSpinButton *
hl_plan_spin_widget (gpointer page, const HlPlanSpin *spin)
{
  return G_STRUCT_MEMBER (GtkSpinButton *, page, spin->widget_offset);
}

double
hl_plan_spin_value (const HlPlan *plan, const HlPlanSpin *spin)
{
  return *(const double *) ((const char *) plan + spin->plan_offset);
}

typedef struct {
  HlPageLink *link;
  const HlPlanSpin *spin;
} HlSpinBinding;

static void
plan_spin_changed_cb (GtkSpinButton *widget, gpointer user_data)
{
  const HlSpinBinding *binding = user_data;
  HlPageLink *link = binding->link;
  double value = gtk_spin_button_get_value (widget);
  HlPlan *plan;

  if (link->syncing > 0 || link->document == NULL
      || hl_plan_spin_value (hl_document_get_plan (link->document), binding->spin) == value
      || (plan = hl_page_link_begin_edit (link, binding->spin->field)) == NULL)
    return;
  *(double *) ((char *) plan + binding->spin->plan_offset) = value;
  hl_document_end_edit (link->document, HL_DOCUMENT_CHANGED_VALUES);
}

static void
spin_binding_free (gpointer data, GClosure *closure)
{
  g_free (data);
}

void
hl_plan_spins_bind (gpointer page, HlPageLink *link, const HlPlanSpin *spins, guint n)
{
  for (guint i = 0; i < n; i++)
    {
      GtkSpinButton *widget = hl_plan_spin_widget (page, &spins[i]);
      HlSpinBinding *binding = g_new (HlSpinBinding, 1);

      binding->link = link;
      binding->spin = &spins[i];
      gtk_spin_button_set_range (widget, spins[i].lower, spins[i].upper);
      gtk_spin_button_set_increments (widget, spins[i].step, spins[i].page);
      gtk_editable_set_enable_undo (GTK_EDITABLE (widget), FALSE);
      g_signal_connect_data (widget, "value-changed", G_CALLBACK (plan_spin_changed_cb),
                             binding, spin_binding_free, 0);
    }
}

void
hl_plan_spins_sync (gpointer page, const HlPlanSpin *spins, guint n, const HlPlan *plan)
{
  for (guint i = 0; i < n; i++)
    hl_ui_set_spin (hl_plan_spin_widget (page, &spins[i]),
                    hl_plan_spin_value (plan, &spins[i]));
}
