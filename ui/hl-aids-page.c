/* hl-aids-page.c: the side panel's "Aids" page (hl-aids-page.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-aids-page"

#include <stddef.h>
#include <glib/gi18n.h>

#include "hl-aids-page.h"
#include "hl-ui-util.h"

/* A cane force in per cent of body weight: at most all of it. */
#define HL_PERCENT_BW_MAX 100.0

struct _HlAidsPage {
  GtkBox parent_instance;

  /* template widgets */
  GtkCheckButton *cane_check;
  GtkDropDown *cane_hand_drop;
  GtkLabel *cane_note_label;
  GtkSpinButton *cane_value_spin;
  GtkDropDown *cane_unit_drop;
  GtkSpinButton *cane_distance_spin;
  GtkSpinButton *load_contra_mass_spin;
  GtkSpinButton *load_contra_distance_spin;
  GtkSpinButton *load_ipsi_mass_spin;
  GtkSpinButton *load_ipsi_distance_spin;
  GtkSpinButton *load_midline_spin;

  HlPageLink link;
};

G_DEFINE_FINAL_TYPE (HlAidsPage, hl_aids_page, GTK_TYPE_BOX)

static const HlPlanSpin spins[] = {
  { G_STRUCT_OFFSET (HlAidsPage, cane_distance_spin), "cane-distance",
    offsetof (HlPlan, cane.distance_mm), 0.0, HL_DISTANCE_MAX_MM, 5.0, 50.0 },
  { G_STRUCT_OFFSET (HlAidsPage, load_contra_mass_spin), "load-contra-mass",
    offsetof (HlPlan, loads.hand[HL_HAND_CONTRALATERAL].mass_kg),
    0.0, HL_HAND_LOAD_MAX_KG, 0.5, 5.0 },
  { G_STRUCT_OFFSET (HlAidsPage, load_contra_distance_spin), "load-contra-distance",
    offsetof (HlPlan, loads.hand[HL_HAND_CONTRALATERAL].distance_mm),
    0.0, HL_DISTANCE_MAX_MM, 5.0, 50.0 },
  { G_STRUCT_OFFSET (HlAidsPage, load_ipsi_mass_spin), "load-ipsi-mass",
    offsetof (HlPlan, loads.hand[HL_HAND_IPSILATERAL].mass_kg),
    0.0, HL_HAND_LOAD_MAX_KG, 0.5, 5.0 },
  { G_STRUCT_OFFSET (HlAidsPage, load_ipsi_distance_spin), "load-ipsi-distance",
    offsetof (HlPlan, loads.hand[HL_HAND_IPSILATERAL].distance_mm),
    0.0, HL_DISTANCE_MAX_MM, 5.0, 50.0 },
  { G_STRUCT_OFFSET (HlAidsPage, load_midline_spin), "load-midline",
    offsetof (HlPlan, loads.midline_kg), 0.0, HL_HAND_LOAD_MAX_KG, 0.5, 5.0 },
};

static double
cane_value_max (HlForceUnit unit)
{
  switch (unit)
    {
    case HL_FORCE_UNIT_N:
      return HL_MASS_MAX_KG * HL_GRAVITY;
    case HL_FORCE_UNIT_PERCENT_BW:
      return HL_PERCENT_BW_MAX;
    case HL_FORCE_UNIT_KG:
    default:
      return HL_MASS_MAX_KG;
    }
}

/* ---- from the plan -------------------------------------------------- */

static void
sync_cane_value (HlAidsPage *self, const HlPlan *plan)
{
  gtk_spin_button_set_range (self->cane_value_spin, 0.0, cane_value_max (plan->cane.unit));
  hl_ui_set_spin (self->cane_value_spin, plan->cane.value);
}

/* The cane's caption: how much people put through a cane, and the plain
 * note of the core when the cane is in the hand on the operated side. */
static void
sync_cane_note (HlAidsPage *self, const HlPlan *plan)
{
  const char *usual = _("Patients rarely put more than about 20 per cent of body "
                        "weight through a cane (Brand and Crowninshield 1980).");
  const char *note = hl_plan_cane_note (plan);
  g_autofree char *text = note != NULL ? g_strdup_printf ("%s\n%s", note, usual)
                                       : g_strdup (usual);

  if (g_strcmp0 (gtk_label_get_text (self->cane_note_label), text) != 0)
    gtk_label_set_text (self->cane_note_label, text);
}

static void
sync_page (HlAidsPage *self)
{
  const HlPlan *plan = hl_document_get_plan (self->link.document);

  self->link.syncing++;
  hl_plan_spins_sync (self, spins, G_N_ELEMENTS (spins), plan);
  gtk_check_button_set_active (self->cane_check, plan->cane.enabled);
  gtk_drop_down_set_selected (self->cane_hand_drop, (guint) plan->cane.hand);
  gtk_drop_down_set_selected (self->cane_unit_drop, (guint) plan->cane.unit);
  sync_cane_value (self, plan);
  sync_cane_note (self, plan);
  self->link.syncing--;
}

static void
document_changed_cb (HlDocument *document, guint what, HlAidsPage *self)
{
  /* A landmark drag moves nothing here but the cane's note. */
  if (what & (HL_DOCUMENT_CHANGED_VALUES | HL_DOCUMENT_CHANGED_REPLACED))
    sync_page (self);
  else if (what & HL_DOCUMENT_CHANGED_PLAN)
    sync_cane_note (self, hl_document_get_plan (document));
}

/* ---- to the plan ---------------------------------------------------- */

static HlPlan *
begin_edit (HlAidsPage *self, const char *field)
{
  return hl_page_link_begin_edit (&self->link, field);
}

static void
end_edit (HlAidsPage *self)
{
  hl_document_end_edit (self->link.document, HL_DOCUMENT_CHANGED_VALUES);
}

static void
cane_toggled_cb (GtkCheckButton *check, HlAidsPage *self)
{
  gboolean on = gtk_check_button_get_active (check);
  HlPlan *plan;

  if (self->link.syncing > 0 || self->link.document == NULL
      || on == hl_document_get_plan (self->link.document)->cane.enabled
      || (plan = begin_edit (self, NULL)) == NULL)
    return;
  plan->cane.enabled = on;
  end_edit (self);
}

static void
cane_hand_cb (GtkDropDown *drop, GParamSpec *pspec, HlAidsPage *self)
{
  HlHand hand = (HlHand) gtk_drop_down_get_selected (drop);
  HlPlan *plan;

  if (self->link.syncing > 0 || self->link.document == NULL
      || hand == hl_document_get_plan (self->link.document)->cane.hand
      || (plan = begin_edit (self, NULL)) == NULL)
    return;
  plan->cane.hand = hand;
  end_edit (self);
}

static void
cane_value_cb (GtkSpinButton *spin, HlAidsPage *self)
{
  double value = gtk_spin_button_get_value (spin);
  HlPlan *plan;

  if (self->link.syncing > 0 || self->link.document == NULL
      || value == hl_document_get_plan (self->link.document)->cane.value
      || (plan = begin_edit (self, "cane-value")) == NULL)
    return;
  plan->cane.value = value;
  end_edit (self);
}

/* The same force in the new unit, so changing the unit changes nothing. */
static void
cane_unit_cb (GtkDropDown *drop, GParamSpec *pspec, HlAidsPage *self)
{
  HlForceUnit unit = (HlForceUnit) gtk_drop_down_get_selected (drop);
  HlPlan *plan;
  double newtons;

  if (self->link.syncing > 0 || self->link.document == NULL
      || unit == hl_document_get_plan (self->link.document)->cane.unit
      || (plan = begin_edit (self, NULL)) == NULL)
    return;
  newtons = hl_force_to_newtons (plan->cane.value, plan->cane.unit, plan->mass_kg);
  plan->cane.unit = unit;
  plan->cane.value = hl_force_from_newtons (newtons, unit, plan->mass_kg);
  self->link.syncing++;
  sync_cane_value (self, plan);
  self->link.syncing--;
  end_edit (self);
}

/* ---- public --------------------------------------------------------- */

void
hl_aids_page_set_document (HlAidsPage *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_AIDS_PAGE (self));
  g_return_if_fail (HL_IS_DOCUMENT (document));
  g_return_if_fail (self->link.document == NULL);
  self->link.document = document;
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  sync_page (self);
}

void
hl_aids_page_print_handles (HlAidsPage *self)
{
  g_return_if_fail (HL_IS_AIDS_PAGE (self));
  hl_ui_print_widget ("cane-check", GTK_WIDGET (self->cane_check));
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_aids_page_dispose (GObject *object)
{
  gtk_widget_dispose_template (GTK_WIDGET (object), HL_TYPE_AIDS_PAGE);
  G_OBJECT_CLASS (hl_aids_page_parent_class)->dispose (object);
}

static void
hl_aids_page_class_init (HlAidsPageClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = hl_aids_page_dispose;
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-aids-page.ui");
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, cane_check);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, cane_hand_drop);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, cane_note_label);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, cane_value_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, cane_unit_drop);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, cane_distance_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, load_contra_mass_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, load_contra_distance_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, load_ipsi_mass_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, load_ipsi_distance_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAidsPage, load_midline_spin);
}

static void
hl_aids_page_init (HlAidsPage *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));

  /* Ctrl+Z in a number field means the plan's undo, not the text's. */
  gtk_editable_set_enable_undo (GTK_EDITABLE (self->cane_value_spin), FALSE);
  gtk_spin_button_set_increments (self->cane_value_spin, 1.0, 10.0);
  hl_plan_spins_bind (self, &self->link, spins, G_N_ELEMENTS (spins));
  g_signal_connect_object (self->cane_check, "toggled", G_CALLBACK (cane_toggled_cb), self, 0);
  g_signal_connect_object (self->cane_hand_drop, "notify::selected",
                           G_CALLBACK (cane_hand_cb), self, 0);
  g_signal_connect_object (self->cane_value_spin, "value-changed",
                           G_CALLBACK (cane_value_cb), self, 0);
  g_signal_connect_object (self->cane_unit_drop, "notify::selected",
                           G_CALLBACK (cane_unit_cb), self, 0);
}
