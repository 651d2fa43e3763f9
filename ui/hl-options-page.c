/* hl-options-page.c: the side panel's "Options" page (hl-options-page.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-options-page"

#include <stddef.h>
#include <glib/gi18n.h>

#include "hl-options-page.h"
#include "hl-template-panel.h"
#include "hl-ui-util.h"

#define HL_RECON_N_PARAMS 6

struct _HlOptionsPage {
  GtkBox parent_instance;

  /* template widgets */
  GtkBox *options_box;
  GtkListBox *option_list;
  GtkButton *add_option_button;
  GtkButton *duplicate_option_button;
  GtkButton *remove_option_button;
  GtkEntry *option_name_entry;
  GtkWidget *option_params;
  GtkLabel *option_hint_label;

  /* built in code */
  GtkSpinButton *recon_spin[HL_RECON_N_PARAMS];
  GtkWidget *template_panel;

  HlPageLink link;
  gboolean disposing;        /* the list emits selections while its rows go */
};

G_DEFINE_FINAL_TYPE (HlOptionsPage, hl_options_page, GTK_TYPE_BOX)

/* The reconstruction parameters, in the order of the page. */
typedef struct {
  const char *key;
  const char *label;
  const char *unit;
  const char *sense;
  size_t offset;          /* of the double in HlRecon */
  double lower, upper;
} HlReconParam;

static const HlReconParam recon_params[HL_RECON_N_PARAMS] = {
  { "cup-medial", N_("Cup medialisation"), N_("mm"), N_("+ medial"),
    offsetof (HlRecon, cup_medial_mm), -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM },
  { "cup-superior", N_("Cup height"), N_("mm"), N_("+ superior"),
    offsetof (HlRecon, cup_superior_mm), -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM },
  { "femoral-offset", N_("Femoral offset change"), N_("mm"), N_("+ lateral"),
    offsetof (HlRecon, femoral_offset_mm), -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM },
  { "femoral-length", N_("Femoral length change"), N_("mm"), N_("+ longer"),
    offsetof (HlRecon, femoral_length_mm), -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM },
  { "head-length", N_("Head length change"), N_("mm"), N_("+ longer neck"),
    offsetof (HlRecon, head_length_mm), -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM },
  { "neck-shaft-angle", N_("Neck-shaft angle"), N_("°"), N_("for the head length"),
    offsetof (HlRecon, neck_shaft_angle_deg), HL_NECK_SHAFT_MIN_DEG, HL_NECK_SHAFT_MAX_DEG },
};

static double
recon_value (const HlRecon *recon, const HlReconParam *param)
{
  return *(const double *) ((const char *) recon + param->offset);
}

static int
selected_index (HlOptionsPage *self)
{
  return hl_document_get_selected_option (self->link.document);
}

static const HlOption *
selected_option (HlOptionsPage *self)
{
  const HlPlan *plan = hl_document_get_plan (self->link.document);
  int index = selected_index (self);

  if (index < 0 || (size_t) index >= plan->n_options)
    return NULL;
  return &plan->options[index];
}

/* ---- from the plan -------------------------------------------------- */

static GtkWidget *
option_row_new (const char *text, gboolean native)
{
  GtkWidget *label = gtk_label_new (text);
  GtkWidget *row = gtk_list_box_row_new ();

  gtk_label_set_xalign (GTK_LABEL (label), 0.0f);
  gtk_label_set_ellipsize (GTK_LABEL (label), PANGO_ELLIPSIZE_END);
  gtk_widget_set_margin_start (label, 8);
  gtk_widget_set_margin_end (label, 8);
  gtk_widget_set_margin_top (label, 6);
  gtk_widget_set_margin_bottom (label, 6);
  if (native)
    gtk_widget_add_css_class (label, "dim-label");
  gtk_list_box_row_set_child (GTK_LIST_BOX_ROW (row), label);
  return row;
}

/* The rows: native first, then each option by its name. */
static void
sync_list (HlOptionsPage *self, const HlPlan *plan)
{
  GtkWidget *child;
  guint n_rows = 0;

  for (child = gtk_widget_get_first_child (GTK_WIDGET (self->option_list));
       child != NULL; child = gtk_widget_get_next_sibling (child))
    n_rows++;
  if (n_rows != 1 + plan->n_options)
    {
      while ((child = gtk_widget_get_first_child (GTK_WIDGET (self->option_list))) != NULL)
        gtk_list_box_remove (self->option_list, child);
      gtk_list_box_append (self->option_list,
                           option_row_new (_("Native hip (no change)"), TRUE));
      for (size_t i = 0; i < plan->n_options; i++)
        gtk_list_box_append (self->option_list,
                             option_row_new (plan->options[i].name, FALSE));
    }
  else
    {
      for (size_t i = 0; i < plan->n_options; i++)
        {
          GtkListBoxRow *row = gtk_list_box_get_row_at_index (self->option_list, (int) i + 1);

          gtk_label_set_text (GTK_LABEL (gtk_list_box_row_get_child (row)),
                              plan->options[i].name);
        }
    }
  gtk_list_box_select_row (self->option_list,
                           gtk_list_box_get_row_at_index (self->option_list,
                                                          selected_index (self) + 1));
}

static void
sync_page (HlOptionsPage *self)
{
  const HlPlan *plan = hl_document_get_plan (self->link.document);
  const HlOption *option = selected_option (self);

  self->link.syncing++;
  sync_list (self, plan);
  gtk_widget_set_sensitive (self->option_params, option != NULL);
  if (option != NULL)
    {
      if (g_strcmp0 (gtk_editable_get_text (GTK_EDITABLE (self->option_name_entry)),
                     option->name) != 0)
        gtk_editable_set_text (GTK_EDITABLE (self->option_name_entry), option->name);
      for (int i = 0; i < HL_RECON_N_PARAMS; i++)
        hl_ui_set_spin (self->recon_spin[i], recon_value (&option->recon, &recon_params[i]));
      /* A templated option's numbers come from its implants
       * (hl-template-panel.c): shown, not edited. */
      for (int i = 0; i < HL_RECON_N_PARAMS; i++)
        gtk_widget_set_sensitive (GTK_WIDGET (self->recon_spin[i]), !option->recon.tmpl.on);
      gtk_label_set_text (self->option_hint_label,
                          _("Changes against the native hip. The schematic shows the selected option over the native hip, drawn faint."));
    }
  else
    {
      HlRecon neutral;

      /* The native hip: no change in any parameter. */
      hl_recon_init (&neutral);
      for (int i = 0; i < HL_RECON_N_PARAMS; i++)
        hl_ui_set_spin (self->recon_spin[i], recon_value (&neutral, &recon_params[i]));
      gtk_editable_set_text (GTK_EDITABLE (self->option_name_entry), "");
      gtk_label_set_text (self->option_hint_label,
                          plan->n_options > 0
                          ? _("Select an option to edit its name and parameters.")
                          : _("No reconstruction options yet: add one to compare it with the native hip."));
    }
  self->link.syncing--;
}

static void
document_changed_cb (HlDocument *document, guint what, HlOptionsPage *self)
{
  /* A landmark drag changes nothing on this page. */
  if (!self->disposing
      && (what & (HL_DOCUMENT_CHANGED_VALUES | HL_DOCUMENT_CHANGED_OPTIONS
                  | HL_DOCUMENT_CHANGED_SELECTION | HL_DOCUMENT_CHANGED_REPLACED)))
    sync_page (self);
}

/* ---- to the plan ---------------------------------------------------- */

static void
option_row_selected_cb (GtkListBox *list, GtkListBoxRow *row, HlOptionsPage *self)
{
  int index;

  if (self->link.syncing > 0 || self->disposing || self->link.document == NULL
      || row == NULL)
    return;
  index = gtk_list_box_row_get_index (row) - 1;
  if (index != selected_index (self))
    hl_document_select_option (self->link.document, index);
}

/* The selected option's own copy in the plan to change (one undo step),
 * or NULL. */
static HlOption *
begin_option_edit (HlOptionsPage *self, const char *key)
{
  int index = selected_index (self);
  g_autofree char *field = g_strdup_printf ("option %d %s", index, key);
  HlPlan *plan = hl_page_link_begin_edit (&self->link, field);

  return plan != NULL ? &plan->options[index] : NULL;
}

static void
option_name_cb (GtkEditable *editable, HlOptionsPage *self)
{
  const char *text = gtk_editable_get_text (editable);
  const HlOption *shown;
  HlOption *option;

  if (self->link.syncing > 0 || self->link.document == NULL
      || (shown = selected_option (self)) == NULL || g_strcmp0 (text, shown->name) == 0
      || (option = begin_option_edit (self, "name")) == NULL)
    return;
  hl_option_set_name (option, text);
  self->link.syncing++;
  sync_list (self, hl_document_get_plan (self->link.document));
  self->link.syncing--;
  hl_document_end_edit (self->link.document, HL_DOCUMENT_CHANGED_OPTIONS);
}

static void
recon_param_cb (GtkSpinButton *spin, gpointer user_data)
{
  const HlReconParam *param = user_data;
  HlOptionsPage *self = HL_OPTIONS_PAGE (gtk_widget_get_ancestor (GTK_WIDGET (spin),
                                                                  HL_TYPE_OPTIONS_PAGE));
  double value = gtk_spin_button_get_value (spin);
  const HlOption *shown;
  HlOption *option;

  if (self->link.syncing > 0 || self->link.document == NULL
      || (shown = selected_option (self)) == NULL
      || recon_value (&shown->recon, param) == value
      || (option = begin_option_edit (self, param->key)) == NULL)
    return;
  *(double *) ((char *) &option->recon + param->offset) = value;
  hl_document_end_edit (self->link.document, HL_DOCUMENT_CHANGED_VALUES);
}

/* One row a parameter: its name and sense, the number, the unit. */
static void
build_option_params (HlOptionsPage *self)
{
  GtkGrid *grid = GTK_GRID (self->option_params);

  for (int i = 0; i < HL_RECON_N_PARAMS; i++)
    {
      const HlReconParam *param = &recon_params[i];
      GtkWidget *names = gtk_box_new (GTK_ORIENTATION_VERTICAL, 0);
      GtkWidget *label = gtk_label_new (_(param->label));
      GtkWidget *sense = gtk_label_new (_(param->sense));
      GtkWidget *spin = gtk_spin_button_new_with_range (param->lower, param->upper, 0.5);
      GtkWidget *unit = gtk_label_new (_(param->unit));

      gtk_label_set_xalign (GTK_LABEL (label), 0.0f);
      gtk_label_set_xalign (GTK_LABEL (sense), 0.0f);
      gtk_widget_add_css_class (sense, "dim-label");
      gtk_widget_add_css_class (sense, "caption");
      gtk_box_append (GTK_BOX (names), label);
      gtk_box_append (GTK_BOX (names), sense);
      gtk_label_set_xalign (GTK_LABEL (unit), 0.0f);
      gtk_widget_add_css_class (unit, "dim-label");
      gtk_spin_button_set_digits (GTK_SPIN_BUTTON (spin), 1);
      gtk_spin_button_set_increments (GTK_SPIN_BUTTON (spin), 0.5, 5.0);
      gtk_editable_set_width_chars (GTK_EDITABLE (spin), 7);
      /* Ctrl+Z in a number field means the plan's undo, not the text's. */
      gtk_editable_set_enable_undo (GTK_EDITABLE (spin), FALSE);
      gtk_widget_set_hexpand (spin, TRUE);
      gtk_accessible_update_property (GTK_ACCESSIBLE (spin),
                                      GTK_ACCESSIBLE_PROPERTY_LABEL, _(param->label), -1);
      g_signal_connect (spin, "value-changed", G_CALLBACK (recon_param_cb),
                        (gpointer) param);
      gtk_grid_attach (grid, names, 0, i + 1, 1, 1);
      gtk_grid_attach (grid, spin, 1, i + 1, 1, 1);
      gtk_grid_attach (grid, unit, 2, i + 1, 1, 1);
      self->recon_spin[i] = GTK_SPIN_BUTTON (spin);
    }
}

/* ---- public --------------------------------------------------------- */

void
hl_options_page_set_document (HlOptionsPage *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_OPTIONS_PAGE (self));
  g_return_if_fail (HL_IS_DOCUMENT (document));
  g_return_if_fail (self->link.document == NULL);
  self->link.document = document;
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  self->template_panel = hl_template_panel_new (document);
  gtk_box_append (self->options_box, self->template_panel);
  sync_page (self);
}

GtkWidget *
hl_options_page_get_template_panel (HlOptionsPage *self)
{
  g_return_val_if_fail (HL_IS_OPTIONS_PAGE (self), NULL);
  return self->template_panel;
}

void
hl_options_page_print_handles (HlOptionsPage *self)
{
  g_return_if_fail (HL_IS_OPTIONS_PAGE (self));
  hl_ui_print_widget ("add-option", GTK_WIDGET (self->add_option_button));
  hl_ui_print_widget ("duplicate-option", GTK_WIDGET (self->duplicate_option_button));
  hl_ui_print_widget ("remove-option", GTK_WIDGET (self->remove_option_button));
  hl_ui_print_widget ("option-name", GTK_WIDGET (self->option_name_entry));
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_options_page_dispose (GObject *object)
{
  HlOptionsPage *self = HL_OPTIONS_PAGE (object);

  self->disposing = TRUE;
  self->template_panel = NULL;
  gtk_widget_dispose_template (GTK_WIDGET (object), HL_TYPE_OPTIONS_PAGE);
  G_OBJECT_CLASS (hl_options_page_parent_class)->dispose (object);
}

static void
hl_options_page_class_init (HlOptionsPageClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = hl_options_page_dispose;
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-options-page.ui");
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, options_box);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, option_list);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, add_option_button);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, duplicate_option_button);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, remove_option_button);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, option_name_entry);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, option_params);
  gtk_widget_class_bind_template_child (widget_class, HlOptionsPage, option_hint_label);
}

static void
hl_options_page_init (HlOptionsPage *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  build_option_params (self);
  g_signal_connect_object (self->option_list, "row-selected",
                           G_CALLBACK (option_row_selected_cb), self, 0);
  g_signal_connect_object (self->option_name_entry, "changed",
                           G_CALLBACK (option_name_cb), self, 0);
}
