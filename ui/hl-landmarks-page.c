/* hl-landmarks-page.c: the side panel's "Landmarks" page (hl-landmarks-page.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-landmarks-page"

#include <math.h>
#include <stdio.h>
#include <glib/gi18n.h>

#include "hl-landmarks-page.h"
#include "hl-ui-util.h"

#define HL_LANDMARK_ID_KEY "hl-landmark-id"

struct _HlLandmarksPage {
  GtkBox parent_instance;

  /* template widgets */
  GtkListBox *landmark_list;
  GtkLabel *landmark_hint_label;

  /* built in code */
  GtkWidget *lm_row[HL_LM_COUNT];
  GtkSpinButton *lm_x[HL_LM_COUNT];
  GtkSpinButton *lm_y[HL_LM_COUNT];
  GtkCheckButton *lm_placed[HL_LM_COUNT];
  GtkWidget *lm_names[HL_LM_COUNT];       /* name and "required"/"optional" */
  GtkWidget *lm_title[4];                 /* the header of each column */

  /* borrowed */
  HlDocument *document;

  /* state */
  guint syncing;             /* > 0 while the controls are set from the plan */
  gboolean disposing;        /* template children are going away */
};

G_DEFINE_FINAL_TYPE (HlLandmarksPage, hl_landmarks_page, GTK_TYPE_BOX)

enum {
  PROP_0,
  PROP_SELECTED_LANDMARK,
  N_PROPS
};

static GParamSpec *props[N_PROPS];

static HlLandmarkId
row_landmark (GtkWidget *widget)
{
  return (HlLandmarkId) GPOINTER_TO_INT (g_object_get_data (G_OBJECT (widget),
                                                            HL_LANDMARK_ID_KEY));
}

/* ---- from the plan -------------------------------------------------- */

static void
sync_landmark (HlLandmarksPage *self, const HlPlan *plan, HlLandmarkId id)
{
  const HlLandmarks *lm = &plan->landmarks;
  gboolean placed = hl_landmarks_has (lm, id);

  self->syncing++;
  if (placed)
    {
      hl_ui_set_spin (self->lm_x[id], lm->p[id].x);
      hl_ui_set_spin (self->lm_y[id], lm->p[id].y);
    }
  gtk_check_button_set_active (self->lm_placed[id], placed);
  if (placed)
    gtk_widget_remove_css_class (self->lm_row[id], "unplaced");
  else
    gtk_widget_add_css_class (self->lm_row[id], "unplaced");
  self->syncing--;
}

static void
sync_page (HlLandmarksPage *self)
{
  const HlPlan *plan = hl_document_get_plan (self->document);

  for (int i = 0; i < HL_LM_COUNT; i++)
    sync_landmark (self, plan, (HlLandmarkId) i);
}

static void
document_changed_cb (HlDocument *document, guint what, HlLandmarksPage *self)
{
  if (!self->disposing && (what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_REPLACED)))
    sync_page (self);
}

static void
show_landmark_hint (HlLandmarksPage *self, int id)
{
  if (id < 0 || id >= HL_LM_COUNT)
    {
      gtk_label_set_text (self->landmark_hint_label,
                          _("Select a landmark to see where it goes."));
      return;
    }
  {
    const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) id);
    g_autofree char *text = g_strdup_printf ("%s: %s", _(info->label), _(info->hint));

    gtk_label_set_text (self->landmark_hint_label, text);
  }
}

/* ---- to the plan ---------------------------------------------------- */

static void
landmark_coord_cb (GtkSpinButton *spin, HlLandmarksPage *self)
{
  HlLandmarkId id = row_landmark (GTK_WIDGET (spin));
  const HlLandmarkInfo *info = hl_landmark_info (id);
  double x = gtk_spin_button_get_value (self->lm_x[id]);
  double y = gtk_spin_button_get_value (self->lm_y[id]);
  g_autofree char *field = NULL;
  const HlLandmarks *lm;
  HlPlan *plan;

  if (self->syncing > 0 || self->document == NULL)
    return;
  lm = &hl_document_get_plan (self->document)->landmarks;
  if (hl_landmarks_has (lm, id) && lm->p[id].x == x && lm->p[id].y == y)
    return;
  field = g_strdup_printf ("landmark %s %c", info->key,
                           spin == self->lm_x[id] ? 'x' : 'y');
  if ((plan = hl_document_begin_edit (self->document, field)) == NULL)
    return;
  hl_landmarks_set (&plan->landmarks, id, x, y);
  sync_landmark (self, plan, id);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_GEOMETRY);
}

static void
landmark_placed_cb (GtkCheckButton *check, HlLandmarksPage *self)
{
  HlLandmarkId id = row_landmark (GTK_WIDGET (check));
  gboolean on = gtk_check_button_get_active (check);
  HlPlan *plan;

  if (self->syncing > 0 || self->document == NULL
      || on == hl_landmarks_has (&hl_document_get_plan (self->document)->landmarks, id))
    return;
  hl_document_break_coalescing (self->document);
  if ((plan = hl_document_begin_edit (self->document, NULL)) == NULL)
    return;
  if (on)
    hl_landmarks_set (&plan->landmarks, id, gtk_spin_button_get_value (self->lm_x[id]),
                      gtk_spin_button_get_value (self->lm_y[id]));
  else
    hl_landmarks_unset (&plan->landmarks, id);
  sync_landmark (self, plan, id);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_GEOMETRY);
}

static void
landmark_row_selected_cb (GtkListBox *list, GtkListBoxRow *row, HlLandmarksPage *self)
{
  int id = row != NULL ? (int) row_landmark (GTK_WIDGET (row)) : -1;

  if (self->disposing)
    return;
  show_landmark_hint (self, id);
  if (self->syncing > 0)
    return;
  g_object_notify_by_pspec (G_OBJECT (self), props[PROP_SELECTED_LANDMARK]);
}

/* ---- the table ------------------------------------------------------ */

static GtkSpinButton *
landmark_spin (HlLandmarksPage *self, HlLandmarkId id, const char *axis_label)
{
  GtkWidget *spin = gtk_spin_button_new_with_range (-HL_COORD_MAX_MM,
                                                    HL_COORD_MAX_MM, 0.5);

  gtk_spin_button_set_digits (GTK_SPIN_BUTTON (spin), 1);
  gtk_spin_button_set_increments (GTK_SPIN_BUTTON (spin), 0.5, 5.0);
  gtk_editable_set_width_chars (GTK_EDITABLE (spin), 5);
  gtk_widget_set_valign (spin, GTK_ALIGN_CENTER);
  /* Ctrl+Z in a number field means the plan's undo, not the text's. */
  gtk_editable_set_enable_undo (GTK_EDITABLE (spin), FALSE);
  gtk_accessible_update_property (GTK_ACCESSIBLE (spin),
                                  GTK_ACCESSIBLE_PROPERTY_LABEL, axis_label, -1);
  g_object_set_data (G_OBJECT (spin), HL_LANDMARK_ID_KEY, GINT_TO_POINTER (id));
  g_signal_connect_object (spin, "value-changed",
                           G_CALLBACK (landmark_coord_cb), self, 0);
  return GTK_SPIN_BUTTON (spin);
}

/* The table's columns: the name (and whether it is required) takes what
 * the coordinates and the check leave; those have fixed widths, and each
 * header title shares its column's width through a size group.  The names
 * wrap (at most LM_NAME_CHARS wide), so no name asks for more than the
 * panel has at its default width, in English or German.  No size group
 * holds a wrapping label: a group measures all its members for one row's
 * height, which would make every name as wide as the longest on one line. */
#define LM_NAME_CHARS 16
/* Room at the right for the overlay scrollbar, px. */
#define LM_SCROLLBAR_ROOM 6

enum { LM_COL_NAME, LM_COL_X, LM_COL_Y, LM_COL_PLACED, LM_N_COLS };

static void
build_landmark_rows (HlLandmarksPage *self)
{
  GtkWidget *header = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  const char *titles[] = { N_("Landmark"), N_("x (mm)"), N_("y (mm)") };
  GtkSizeGroup *cols[LM_N_COLS] = { NULL };

  for (int k = LM_COL_X; k < LM_N_COLS; k++)
    cols[k] = gtk_size_group_new (GTK_SIZE_GROUP_HORIZONTAL);
  for (guint i = 0; i < G_N_ELEMENTS (titles); i++)
    {
      GtkWidget *title = gtk_label_new (_(titles[i]));

      gtk_widget_add_css_class (title, "heading");
      gtk_label_set_xalign (GTK_LABEL (title), 0.0f);
      if (i == LM_COL_NAME)
        {
          gtk_label_set_ellipsize (GTK_LABEL (title), PANGO_ELLIPSIZE_END);
          gtk_widget_set_hexpand (title, TRUE);
        }
      else
        gtk_size_group_add_widget (cols[i], title);
      gtk_box_append (GTK_BOX (header), title);
      self->lm_title[i] = title;
    }
  /* "Placed" as a check mark over the column of check boxes: the word
   * ("Gesetzt" in German) is wider than the boxes. */
  {
    GtkWidget *mark = gtk_image_new_from_icon_name ("object-select-symbolic");

    gtk_widget_set_tooltip_text (mark, _("Placed"));
    gtk_accessible_update_property (GTK_ACCESSIBLE (mark),
                                    GTK_ACCESSIBLE_PROPERTY_LABEL, _("Placed"), -1);
    gtk_size_group_add_widget (cols[LM_COL_PLACED], mark);
    gtk_box_append (GTK_BOX (header), mark);
    self->lm_title[LM_COL_PLACED] = mark;
  }
  gtk_widget_add_css_class (header, "landmark-header");
  gtk_widget_set_margin_end (header, LM_SCROLLBAR_ROOM);
  gtk_list_box_set_placeholder (self->landmark_list, NULL);
  gtk_list_box_prepend (self->landmark_list, header);
  gtk_list_box_row_set_selectable (GTK_LIST_BOX_ROW (gtk_widget_get_parent (header)), FALSE);
  gtk_list_box_row_set_activatable (GTK_LIST_BOX_ROW (gtk_widget_get_parent (header)), FALSE);

  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      HlLandmarkId id = (HlLandmarkId) i;
      const HlLandmarkInfo *info = hl_landmark_info (id);
      GtkWidget *box = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
      GtkWidget *names_box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 0);
      GtkWidget *name = gtk_label_new (_(info->label));
      GtkWidget *kind = gtk_label_new (info->required ? _("required") : _("optional"));
      GtkWidget *placed = gtk_check_button_new ();
      GtkWidget *row;

      gtk_label_set_xalign (GTK_LABEL (name), 0.0f);
      gtk_label_set_wrap (GTK_LABEL (name), TRUE);
      gtk_label_set_wrap_mode (GTK_LABEL (name), PANGO_WRAP_WORD_CHAR);
      gtk_label_set_max_width_chars (GTK_LABEL (name), LM_NAME_CHARS);
      gtk_label_set_xalign (GTK_LABEL (kind), 0.0f);
      gtk_widget_add_css_class (kind, "caption");
      gtk_widget_add_css_class (kind, info->required ? "required" : "dim-label");
      gtk_box_append (GTK_BOX (names_box), name);
      gtk_box_append (GTK_BOX (names_box), kind);
      gtk_widget_set_hexpand (names_box, TRUE);
      gtk_widget_set_valign (names_box, GTK_ALIGN_CENTER);
      gtk_box_append (GTK_BOX (box), names_box);
      self->lm_names[i] = names_box;

      self->lm_x[i] = landmark_spin (self, id, _("x (mm)"));
      self->lm_y[i] = landmark_spin (self, id, _("y (mm)"));
      gtk_size_group_add_widget (cols[LM_COL_X], GTK_WIDGET (self->lm_x[i]));
      gtk_size_group_add_widget (cols[LM_COL_Y], GTK_WIDGET (self->lm_y[i]));
      gtk_box_append (GTK_BOX (box), GTK_WIDGET (self->lm_x[i]));
      gtk_box_append (GTK_BOX (box), GTK_WIDGET (self->lm_y[i]));

      g_object_set_data (G_OBJECT (placed), HL_LANDMARK_ID_KEY, GINT_TO_POINTER (id));
      gtk_widget_set_valign (placed, GTK_ALIGN_CENTER);
      gtk_accessible_update_property (GTK_ACCESSIBLE (placed),
                                      GTK_ACCESSIBLE_PROPERTY_LABEL, _("Placed"), -1);
      g_signal_connect_object (placed, "toggled",
                               G_CALLBACK (landmark_placed_cb), self, 0);
      self->lm_placed[i] = GTK_CHECK_BUTTON (placed);
      gtk_size_group_add_widget (cols[LM_COL_PLACED], placed);
      gtk_box_append (GTK_BOX (box), placed);

      row = gtk_list_box_row_new ();
      gtk_widget_set_margin_end (box, LM_SCROLLBAR_ROOM);
      gtk_list_box_row_set_child (GTK_LIST_BOX_ROW (row), box);
      gtk_widget_set_tooltip_text (row, _(info->hint));
      g_object_set_data (G_OBJECT (row), HL_LANDMARK_ID_KEY, GINT_TO_POINTER (id));
      gtk_list_box_append (self->landmark_list, row);
      self->lm_row[i] = row;
    }
  /* The widgets hold their groups from here on. */
  for (int k = LM_COL_X; k < LM_N_COLS; k++)
    g_object_unref (cols[k]);
  g_signal_connect_object (self->landmark_list, "row-selected",
                           G_CALLBACK (landmark_row_selected_cb), self, 0);
  show_landmark_hint (self, -1);
}

/* ---- public --------------------------------------------------------- */

void
hl_landmarks_page_set_document (HlLandmarksPage *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_LANDMARKS_PAGE (self));
  g_return_if_fail (HL_IS_DOCUMENT (document));
  self->document = document;
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  sync_page (self);
}

int
hl_landmarks_page_get_selected_landmark (HlLandmarksPage *self)
{
  GtkListBoxRow *row;

  g_return_val_if_fail (HL_IS_LANDMARKS_PAGE (self), -1);
  row = gtk_list_box_get_selected_row (self->landmark_list);
  for (int i = 0; i < HL_LM_COUNT && row != NULL; i++)
    if (self->lm_row[i] == GTK_WIDGET (row))
      return i;
  return -1;
}

void
hl_landmarks_page_set_selected_landmark (HlLandmarksPage *self, int id)
{
  GtkListBoxRow *current;

  g_return_if_fail (HL_IS_LANDMARKS_PAGE (self));
  if (self->disposing)
    return;
  current = gtk_list_box_get_selected_row (self->landmark_list);
  self->syncing++;
  if (id < 0 || id >= HL_LM_COUNT)
    gtk_list_box_unselect_all (self->landmark_list);
  else if (current == NULL || GTK_WIDGET (current) != self->lm_row[id])
    gtk_list_box_select_row (self->landmark_list, GTK_LIST_BOX_ROW (self->lm_row[id]));
  self->syncing--;
  show_landmark_hint (self, id);
}

/* The width a widget was given with its CSS margins, as its natural width
 * is measured. */
static int
allocated_width (GtkWidget *widget)
{
  GtkAllocation a;

  gtk_widget_get_allocation (widget, &a);
  return a.width;
}

static GtkWidget *
table_cell (HlLandmarksPage *self, int col, int row)
{
  switch (col)
    {
    case LM_COL_NAME: return self->lm_names[row];
    case LM_COL_X: return GTK_WIDGET (self->lm_x[row]);
    case LM_COL_Y: return GTK_WIDGET (self->lm_y[row]);
    default: return GTK_WIDGET (self->lm_placed[row]);
    }
}

/* For each column of the table (the header's title as row -1), how it
 * fits the panel: "LMTABLE COLUMN SHORT OVER SHIFT", the most any cell
 * lacks of its natural width, the most any cell reaches past the right
 * edge of the table's view, in px (<= 0: fits), and the most a title's
 * left edge is off its column's. */
static void
print_table_columns (HlLandmarksPage *self)
{
  static const char *const names[LM_N_COLS] = { "name", "x", "y", "placed" };
  GtkWidget *view = gtk_widget_get_parent (GTK_WIDGET (self->landmark_list));

  if (!gtk_widget_get_mapped (GTK_WIDGET (self->landmark_list)))
    return;
  for (int k = 0; k < LM_N_COLS; k++)
    {
      int shortfall = G_MININT, over = G_MININT, shift = 0;
      double cell_x = NAN;

      for (int r = 0; r < HL_LM_COUNT; r++)
        {
          GtkWidget *cell = table_cell (self, k, r);
          graphene_rect_t b;
          int nat;

          gtk_widget_measure (cell, GTK_ORIENTATION_HORIZONTAL, -1, NULL, &nat, NULL, NULL);
          if (!gtk_widget_compute_bounds (cell, view, &b))
            continue;
          shortfall = MAX (shortfall, nat - allocated_width (cell));
          over = MAX (over, (int) ceil (b.origin.x + b.size.width) - gtk_widget_get_width (view));
          if (isnan (cell_x))
            cell_x = b.origin.x;
        }
      {
        GtkWidget *title = self->lm_title[k];
        graphene_rect_t b;
        int nat;

        gtk_widget_measure (title, GTK_ORIENTATION_HORIZONTAL, -1, NULL, &nat, NULL, NULL);
        if (gtk_widget_compute_bounds (title, view, &b))
          {
            shortfall = MAX (shortfall, nat - allocated_width (title));
            over = MAX (over, (int) ceil (b.origin.x + b.size.width) - gtk_widget_get_width (view));
            if (!isnan (cell_x))
              shift = (int) fabs (b.origin.x - cell_x);
          }
      }
      printf ("LMTABLE %s %d %d %d\n", names[k], shortfall, over, shift);
    }
}

void
hl_landmarks_page_print_handles (HlLandmarksPage *self)
{
  g_return_if_fail (HL_IS_LANDMARKS_PAGE (self));
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      const char *key = hl_landmark_info ((HlLandmarkId) i)->key;
      g_autofree char *x = g_strdup_printf ("lm-x-%s", key);
      g_autofree char *y = g_strdup_printf ("lm-y-%s", key);

      hl_ui_print_widget (x, GTK_WIDGET (self->lm_x[i]));
      hl_ui_print_widget (y, GTK_WIDGET (self->lm_y[i]));
    }
  print_table_columns (self);
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_landmarks_page_get_property (GObject *object, guint prop_id, GValue *value,
                                GParamSpec *pspec)
{
  HlLandmarksPage *self = HL_LANDMARKS_PAGE (object);

  switch (prop_id)
    {
    case PROP_SELECTED_LANDMARK:
      g_value_set_int (value, hl_landmarks_page_get_selected_landmark (self));
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, prop_id, pspec);
    }
}

static void
hl_landmarks_page_set_property (GObject *object, guint prop_id, const GValue *value,
                                GParamSpec *pspec)
{
  HlLandmarksPage *self = HL_LANDMARKS_PAGE (object);

  switch (prop_id)
    {
    case PROP_SELECTED_LANDMARK:
      hl_landmarks_page_set_selected_landmark (self, g_value_get_int (value));
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, prop_id, pspec);
    }
}

static void
hl_landmarks_page_dispose (GObject *object)
{
  HL_LANDMARKS_PAGE (object)->disposing = TRUE;
  gtk_widget_dispose_template (GTK_WIDGET (object), HL_TYPE_LANDMARKS_PAGE);
  G_OBJECT_CLASS (hl_landmarks_page_parent_class)->dispose (object);
}

static void
hl_landmarks_page_class_init (HlLandmarksPageClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->get_property = hl_landmarks_page_get_property;
  object_class->set_property = hl_landmarks_page_set_property;
  object_class->dispose = hl_landmarks_page_dispose;

  /* Notified only when the user selects a row, not when it is set. */
  props[PROP_SELECTED_LANDMARK] =
    g_param_spec_int ("selected-landmark", NULL, NULL, -1, HL_LM_COUNT - 1, -1,
                      G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, props);

  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-landmarks-page.ui");
  gtk_widget_class_bind_template_child (widget_class, HlLandmarksPage, landmark_list);
  gtk_widget_class_bind_template_child (widget_class, HlLandmarksPage, landmark_hint_label);
}

static void
hl_landmarks_page_init (HlLandmarksPage *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  build_landmark_rows (self);
}
