/* hl-window-panel.c: the side panel's options page.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every control writes straight into the plan after recording an undo step
 * and then ends the edit (hl_window_end_edit): the document solves once
 * and every view follows its "changed" signal.
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-window-panel"

#include <math.h>
#include <stddef.h>
#include <glib/gi18n.h>

#include "hl-window.h"
#include "hl-window-private.h"

/* The reconstruction parameters, in the order of the option panel. */
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

static HlOption *
selected_option (HlWindow *self)
{
  if (hl_window_selected_option (self) < 0
      || (size_t) hl_window_selected_option (self) >= self->plan->n_options)
    return NULL;
  return &self->plan->options[hl_window_selected_option (self)];
}

/* Ctrl+Z in a number field means the plan's undo, not the text's. */
static void
plan_undo_only (GtkSpinButton *spin)
{
  gtk_editable_set_enable_undo (GTK_EDITABLE (spin), FALSE);
}

static void
set_spin (GtkSpinButton *spin, double value)
{
  if (isfinite (value) && gtk_spin_button_get_value (spin) != value)
    gtk_spin_button_set_value (spin, value);
}

/* ---- options -------------------------------------------------------- */

static void
option_row_selected_cb (GtkListBox *list, GtkListBoxRow *row, HlWindow *self)
{
  int index;

  if (self->syncing > 0 || self->disposing || row == NULL)
    return;
  index = gtk_list_box_row_get_index (row) - 1;
  if (index != hl_window_selected_option (self))
    hl_window_select_option (self, index);
}

static void
option_name_cb (GtkEditable *editable, HlWindow *self)
{
  HlOption *option = selected_option (self);
  const char *text = gtk_editable_get_text (editable);
  g_autofree char *field = NULL;

  if (self->syncing > 0 || option == NULL || g_strcmp0 (text, option->name) == 0)
    return;
  field = g_strdup_printf ("option %d name", hl_window_selected_option (self));
  if (!hl_window_begin_edit (self, field))
    return;
  hl_option_set_name (option, text);
  hl_window_panel_sync_options (self);
  hl_window_end_edit (self, HL_DOCUMENT_CHANGED_OPTIONS);
}

static void
recon_param_cb (GtkSpinButton *spin, gpointer user_data)
{
  const HlReconParam *param = user_data;
  HlWindow *self = HL_WINDOW (gtk_widget_get_root (GTK_WIDGET (spin)));
  HlOption *option = selected_option (self);
  double value = gtk_spin_button_get_value (spin);
  double *target;
  g_autofree char *field = NULL;

  if (self->syncing > 0 || option == NULL)
    return;
  target = (double *) ((char *) &option->recon + param->offset);
  if (*target == value)
    return;
  field = g_strdup_printf ("option %d %s", hl_window_selected_option (self), param->key);
  if (!hl_window_begin_edit (self, field))
    return;
  *target = value;
  hl_window_end_edit (self, HL_DOCUMENT_CHANGED_VALUES);
}

static void
build_option_params (HlWindow *self)
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
      plan_undo_only (GTK_SPIN_BUTTON (spin));
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

void
hl_window_panel_sync_options (HlWindow *self)
{
  HlOption *option = selected_option (self);
  GtkWidget *child;
  guint n_rows = 0;
  GtkListBoxRow *row;

  self->syncing++;
  for (child = gtk_widget_get_first_child (GTK_WIDGET (self->option_list));
       child != NULL; child = gtk_widget_get_next_sibling (child))
    n_rows++;
  if (n_rows != 1 + self->plan->n_options)
    {
      while ((child = gtk_widget_get_first_child (GTK_WIDGET (self->option_list))) != NULL)
        gtk_list_box_remove (self->option_list, child);
      gtk_list_box_append (self->option_list,
                           option_row_new (_("Native hip (no change)"), TRUE));
      for (size_t i = 0; i < self->plan->n_options; i++)
        gtk_list_box_append (self->option_list,
                             option_row_new (self->plan->options[i].name, FALSE));
    }
  else
    {
      for (size_t i = 0; i < self->plan->n_options; i++)
        {
          GtkWidget *label;

          row = gtk_list_box_get_row_at_index (self->option_list, (int) i + 1);
          label = gtk_list_box_row_get_child (row);
          gtk_label_set_text (GTK_LABEL (label), self->plan->options[i].name);
        }
    }
  row = gtk_list_box_get_row_at_index (self->option_list, hl_window_selected_option (self) + 1);
  gtk_list_box_select_row (self->option_list, row);

  gtk_widget_set_sensitive (self->option_params, option != NULL);
  if (option != NULL)
    {
      if (g_strcmp0 (gtk_editable_get_text (GTK_EDITABLE (self->option_name_entry)),
                     option->name) != 0)
        gtk_editable_set_text (GTK_EDITABLE (self->option_name_entry), option->name);
      for (int i = 0; i < HL_RECON_N_PARAMS; i++)
        set_spin (self->recon_spin[i],
                  *(double *) ((char *) &option->recon + recon_params[i].offset));
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
        set_spin (self->recon_spin[i],
                  *(double *) ((char *) &neutral + recon_params[i].offset));
      gtk_editable_set_text (GTK_EDITABLE (self->option_name_entry), "");
      gtk_label_set_text (self->option_hint_label,
                          self->plan->n_options > 0
                          ? _("Select an option to edit its name and parameters.")
                          : _("No reconstruction options yet: add one to compare it with the native hip."));
    }
  self->syncing--;
}

/* ---- all ------------------------------------------------------------ */

void
hl_window_panel_sync (HlWindow *self)
{
  hl_window_panel_sync_options (self);
}

void
hl_window_panel_init (HlWindow *self)
{
  build_option_params (self);
  g_signal_connect_object (self->option_list, "row-selected",
                           G_CALLBACK (option_row_selected_cb), self, 0);
  g_signal_connect_object (self->option_name_entry, "changed",
                           G_CALLBACK (option_name_cb), self, 0);
}

void
hl_window_panel_bind_template (GtkWidgetClass *widget_class)
{
  gtk_widget_class_bind_template_child (widget_class, HlWindow, case_page);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, landmarks_page);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, option_list);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, add_option_button);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, duplicate_option_button);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, remove_option_button);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, option_name_entry);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, option_params);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, option_hint_label);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, aids_page);
}
