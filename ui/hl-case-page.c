/* hl-case-page.c: the side panel's "Case" page (hl-case-page.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-case-page"

#include <stddef.h>
#include <glib/gi18n.h>

#include "hl-case-page.h"
#include "hl-settings.h"
#include "hl-text.h"
#include "hl-ui-util.h"

/* The international avoirdupois pound, exactly. */
#define HL_KG_PER_LB 0.45359237

/* Control ranges of our own where the core has no limit to borrow. */
#define HL_LIMB_FRACTION_MIN 0.05
#define HL_LIMB_FRACTION_MAX 0.35
#define HL_LINE_ANGLE_MIN_DEG 10.0
#define HL_LINE_ANGLE_MAX_DEG 90.0
#define HL_CAPACITY_MAX_NM_PER_KG 4.0

struct _HlCasePage {
  GtkBox parent_instance;

  /* template widgets */
  GtkEntry *label_entry;
  GtkSpinButton *mass_spin;
  GtkDropDown *mass_unit_drop;
  GtkDropDown *side_drop;
  GtkDropDown *limb_drop;
  GtkSpinButton *limb_custom_spin;
  GtkDropDown *bw_line_drop;
  GtkDropDown *abductor_mode_drop;
  GtkSpinButton *abductor_angle_spin;
  GtkSpinButton *lean_spin;
  GtkSpinButton *capacity_spin;

  HlPageLink link;
  gboolean use_pounds;
};

G_DEFINE_FINAL_TYPE (HlCasePage, hl_case_page, GTK_TYPE_BOX)

enum {
  SIGNAL_SIDE_CHANGED,
  N_SIGNALS
};

static guint signals[N_SIGNALS];

static const HlPlanSpin spins[] = {
  { G_STRUCT_OFFSET (HlCasePage, limb_custom_spin), "limb-fraction",
    offsetof (HlPlan, model.limb_fraction_custom),
    HL_LIMB_FRACTION_MIN, HL_LIMB_FRACTION_MAX, 0.001, 0.01 },
  { G_STRUCT_OFFSET (HlCasePage, abductor_angle_spin), "abductor-angle",
    offsetof (HlPlan, model.abductor_angle_deg),
    HL_LINE_ANGLE_MIN_DEG, HL_LINE_ANGLE_MAX_DEG, 0.5, 5.0 },
  { G_STRUCT_OFFSET (HlCasePage, lean_spin), "lean",
    offsetof (HlPlan, model.lean_mm), HL_LEAN_MIN_MM, HL_LEAN_MAX_MM, 0.5, 5.0 },
  { G_STRUCT_OFFSET (HlCasePage, capacity_spin), "capacity",
    offsetof (HlPlan, capacity.torque_nm_per_kg), 0.0, HL_CAPACITY_MAX_NM_PER_KG,
    0.01, 0.1 },
};

/* A dropdown whose position is one enum of the plan. */
typedef struct {
  size_t widget_offset;      /* of the GtkDropDown * in HlCasePage */
  size_t plan_offset;        /* of the enum in HlPlan */
} HlCaseDrop;

static const HlCaseDrop drops[] = {
  { G_STRUCT_OFFSET (HlCasePage, bw_line_drop), offsetof (HlPlan, model.bw_line) },
  { G_STRUCT_OFFSET (HlCasePage, abductor_mode_drop), offsetof (HlPlan, model.abductor_line) },
};

static GtkDropDown *
drop_at (HlCasePage *self, const HlCaseDrop *b)
{
  return G_STRUCT_MEMBER (GtkDropDown *, self, b->widget_offset);
}

static int
plan_enum (const HlPlan *plan, size_t offset)
{
  return *(const int *) ((const char *) plan + offset);
}

/* ---- from the plan -------------------------------------------------- */

static void
sync_mass (HlCasePage *self, const HlPlan *plan)
{
  double factor = self->use_pounds ? 1.0 / HL_KG_PER_LB : 1.0;

  gtk_spin_button_set_range (self->mass_spin, HL_MASS_MIN_KG * factor,
                             HL_MASS_MAX_KG * factor);
  hl_ui_set_spin (self->mass_spin, plan->mass_kg * factor);
}

static void
sync_page (HlCasePage *self)
{
  const HlPlan *plan = hl_document_get_plan (self->link.document);

  self->link.syncing++;
  if (g_strcmp0 (gtk_editable_get_text (GTK_EDITABLE (self->label_entry)), plan->label) != 0)
    gtk_editable_set_text (GTK_EDITABLE (self->label_entry), plan->label);
  sync_mass (self, plan);
  gtk_drop_down_set_selected (self->side_drop, plan->side == HL_SIDE_LEFT ? 1 : 0);
  gtk_drop_down_set_selected (self->limb_drop, (guint) plan->model.limb_table);
  gtk_widget_set_sensitive (GTK_WIDGET (self->limb_custom_spin),
                            plan->model.limb_table == HL_LIMB_CUSTOM);
  hl_plan_spins_sync (self, spins, G_N_ELEMENTS (spins), plan);
  for (guint i = 0; i < G_N_ELEMENTS (drops); i++)
    gtk_drop_down_set_selected (drop_at (self, &drops[i]),
                                (guint) plan_enum (plan, drops[i].plan_offset));
  self->link.syncing--;
}

static void
document_changed_cb (HlDocument *document, guint what, HlCasePage *self)
{
  /* A landmark drag moves nothing on this page. */
  if (what & (HL_DOCUMENT_CHANGED_VALUES | HL_DOCUMENT_CHANGED_REPLACED))
    sync_page (self);
}

/* ---- to the plan ---------------------------------------------------- */

static HlPlan *
begin_edit (HlCasePage *self, const char *field)
{
  return hl_page_link_begin_edit (&self->link, field);
}

static void
end_edit (HlCasePage *self, HlDocumentChange what)
{
  hl_document_end_edit (self->link.document, what);
}

static void
label_changed_cb (GtkEditable *editable, HlCasePage *self)
{
  const char *text = gtk_editable_get_text (editable);
  HlPlan *plan;

  if (self->link.syncing > 0 || self->link.document == NULL
      || g_strcmp0 (text, hl_document_get_plan (self->link.document)->label) == 0
      || (plan = begin_edit (self, "label")) == NULL)
    return;
  g_strlcpy (plan->label, text, sizeof plan->label);
  hl_utf8_trim_end (plan->label);   /* never cut inside a character */
  end_edit (self, HL_DOCUMENT_CHANGED_VALUES);
}

static void
mass_changed_cb (GtkSpinButton *spin, HlCasePage *self)
{
  double kg = gtk_spin_button_get_value (spin)
              * (self->use_pounds ? HL_KG_PER_LB : 1.0);
  HlPlan *plan;

  if ((plan = begin_edit (self, "mass")) == NULL)
    return;
  plan->mass_kg = kg;
  end_edit (self, HL_DOCUMENT_CHANGED_VALUES);
}

/* A view setting: the plan keeps kilograms. */
static void
mass_unit_cb (GtkDropDown *drop, GParamSpec *pspec, HlCasePage *self)
{
  self->use_pounds = gtk_drop_down_get_selected (drop) == 1;
  if (self->link.document == NULL)
    return;
  self->link.syncing++;
  sync_mass (self, hl_document_get_plan (self->link.document));
  self->link.syncing--;
}

static void
side_cb (GtkDropDown *drop, GParamSpec *pspec, HlCasePage *self)
{
  HlSide side = gtk_drop_down_get_selected (drop) == 1 ? HL_SIDE_LEFT : HL_SIDE_RIGHT;
  HlPlan *plan;

  if (self->link.syncing > 0 || self->link.document == NULL
      || side == hl_document_get_plan (self->link.document)->side
      || (plan = begin_edit (self, NULL)) == NULL)
    return;
  /* Over a radiograph the landmarks must stay on their pixels: the side
   * only names which hip they belong to.  On the schematic, mirroring keeps
   * the drawing of the operated hip where it belongs. */
  if (plan->radiograph.present)
    plan->side = side;
  else
    hl_plan_mirror (plan);
  end_edit (self, HL_DOCUMENT_CHANGED_GEOMETRY | HL_DOCUMENT_CHANGED_VALUES);
  g_signal_emit (self, signals[SIGNAL_SIDE_CHANGED], 0);
}

static void
limb_cb (GtkDropDown *drop, GParamSpec *pspec, HlCasePage *self)
{
  guint table = gtk_drop_down_get_selected (drop);
  HlPlan *plan;

  gtk_widget_set_sensitive (GTK_WIDGET (self->limb_custom_spin),
                            table == HL_LIMB_CUSTOM);
  if (self->link.syncing > 0 || self->link.document == NULL || table >= HL_LIMB_N
      || table == (guint) hl_document_get_plan (self->link.document)->model.limb_table
      || (plan = begin_edit (self, NULL)) == NULL)
    return;
  plan->model.limb_table = (HlLimbTable) table;
  end_edit (self, HL_DOCUMENT_CHANGED_VALUES);
}

static void
drop_cb (GtkDropDown *drop, GParamSpec *pspec, gpointer user_data)
{
  const HlCaseDrop *b = user_data;
  HlCasePage *self = HL_CASE_PAGE (gtk_widget_get_ancestor (GTK_WIDGET (drop),
                                                            HL_TYPE_CASE_PAGE));
  int value = (int) gtk_drop_down_get_selected (drop);
  HlPlan *plan;

  if (self->link.syncing > 0 || self->link.document == NULL
      || plan_enum (hl_document_get_plan (self->link.document), b->plan_offset) == value
      || (plan = begin_edit (self, NULL)) == NULL)
    return;
  *(int *) ((char *) plan + b->plan_offset) = value;
  end_edit (self, HL_DOCUMENT_CHANGED_VALUES);
}

/* Under the model choices, as the row after the trunk lean's. */
static void
add_defaults_button (HlCasePage *self)
{
  GtkWidget *anchor = GTK_WIDGET (self->lean_spin);
  GtkWidget *grid = gtk_widget_get_parent (anchor);
  int row = 0;

  if (!GTK_IS_GRID (grid))
    return;
  gtk_grid_query_child (GTK_GRID (grid), anchor, NULL, &row, NULL, NULL);
  gtk_grid_insert_row (GTK_GRID (grid), row + 1);
  gtk_grid_attach (GTK_GRID (grid), hl_settings_defaults_button_new (self->link.document),
                   0, row + 1, 3, 1);
}

/* ---- public --------------------------------------------------------- */

void
hl_case_page_set_document (HlCasePage *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_CASE_PAGE (self));
  g_return_if_fail (HL_IS_DOCUMENT (document));
  g_return_if_fail (self->link.document == NULL);
  self->link.document = document;
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  add_defaults_button (self);
  sync_page (self);
}

void
hl_case_page_print_handles (HlCasePage *self)
{
  g_return_if_fail (HL_IS_CASE_PAGE (self));
  hl_ui_print_widget ("mass-spin", GTK_WIDGET (self->mass_spin));
  hl_ui_print_widget ("mass-unit", GTK_WIDGET (self->mass_unit_drop));
  hl_ui_print_widget ("side", GTK_WIDGET (self->side_drop));
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_case_page_dispose (GObject *object)
{
  gtk_widget_dispose_template (GTK_WIDGET (object), HL_TYPE_CASE_PAGE);
  G_OBJECT_CLASS (hl_case_page_parent_class)->dispose (object);
}

static void
hl_case_page_class_init (HlCasePageClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = hl_case_page_dispose;

  /* The operated side was changed from this page (after the edit). */
  signals[SIGNAL_SIDE_CHANGED] =
    g_signal_new ("side-changed", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 0);

  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-case-page.ui");
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, label_entry);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, mass_spin);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, mass_unit_drop);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, side_drop);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, limb_drop);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, limb_custom_spin);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, bw_line_drop);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, abductor_mode_drop);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, abductor_angle_spin);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, lean_spin);
  gtk_widget_class_bind_template_child (widget_class, HlCasePage, capacity_spin);
}

static void
hl_case_page_init (HlCasePage *self)
{
  g_autoptr(GtkStringList) limbs = gtk_string_list_new (NULL);

  gtk_widget_init_template (GTK_WIDGET (self));

  for (int t = 0; t < HL_LIMB_N; t++)
    gtk_string_list_append (limbs, _(hl_limb_table_info ((HlLimbTable) t)->label));
  gtk_drop_down_set_model (self->limb_drop, G_LIST_MODEL (limbs));

  /* Ctrl+Z in a number field means the plan's undo, not the text's. */
  gtk_spin_button_set_increments (self->mass_spin, 0.5, 5.0);
  gtk_editable_set_enable_undo (GTK_EDITABLE (self->mass_spin), FALSE);
  hl_plan_spins_bind (self, &self->link, spins, G_N_ELEMENTS (spins));
  for (guint i = 0; i < G_N_ELEMENTS (drops); i++)
    g_signal_connect (drop_at (self, &drops[i]), "notify::selected",
                      G_CALLBACK (drop_cb), (gpointer) &drops[i]);

  g_signal_connect_object (self->label_entry, "changed", G_CALLBACK (label_changed_cb), self, 0);
  g_signal_connect_object (self->mass_spin, "value-changed", G_CALLBACK (mass_changed_cb), self, 0);
  g_signal_connect_object (self->mass_unit_drop, "notify::selected",
                           G_CALLBACK (mass_unit_cb), self, 0);
  g_signal_connect_object (self->side_drop, "notify::selected", G_CALLBACK (side_cb), self, 0);
  g_signal_connect_object (self->limb_drop, "notify::selected", G_CALLBACK (limb_cb), self, 0);

  hl_settings_track_mass_unit (self->mass_unit_drop);
}
