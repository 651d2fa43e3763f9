/* hl-a11y.c: accessibility test hooks (see hl-a11y.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-a11y"

#include <stdio.h>

#include "hl-a11y.h"

static gboolean
env_set (const char *name)
{
  return g_strcmp0 (g_getenv (name), "1") == 0;
}

static void
print_labels_in (GtkWidget *widget)
{
  if (!gtk_widget_get_visible (widget) || !gtk_widget_get_child_visible (widget))
    return;
  if (GTK_IS_LABEL (widget))
    {
      const char *text = gtk_label_get_text (GTK_LABEL (widget));
      if (text != NULL && text[0] != '\0')
        {
          g_autofree char *line = g_strdup (text);
          g_strdelimit (line, "\n\r\t", ' ');
          printf ("LABEL %s\n", line);
        }
    }
  for (GtkWidget *c = gtk_widget_get_first_child (widget); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    print_labels_in (c);
}

void
hl_a11y_print_labels (GtkWidget *root)
{
  print_labels_in (root);
  fflush (stdout);
}

/* A widget names itself through a visible label inside it (buttons, check
 * buttons, switcher tabs, list rows). */
static gboolean
has_own_text (GtkWidget *widget)
{
  if (GTK_IS_LABEL (widget))
    {
      const char *text = gtk_label_get_text (GTK_LABEL (widget));
      return text != NULL && text[0] != '\0';
    }
  if (GTK_IS_BUTTON (widget))
    {
      const char *text = gtk_button_get_label (GTK_BUTTON (widget));
      if (text != NULL && text[0] != '\0')
        return TRUE;
    }
  if (GTK_IS_CHECK_BUTTON (widget))
    {
      const char *text = gtk_check_button_get_label (GTK_CHECK_BUTTON (widget));
      if (text != NULL && text[0] != '\0')
        return TRUE;
    }
  for (GtkWidget *c = gtk_widget_get_first_child (widget); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    if (gtk_widget_get_visible (c) && has_own_text (c))
      return TRUE;
  return FALSE;
}

/* Spin buttons, entries and drop-downs show a value, not what it is: they
 * need a label or a labelled-by relation. */
static gboolean
shows_value (GtkWidget *widget)
{
  return GTK_IS_SPIN_BUTTON (widget) || GTK_IS_ENTRY (widget) || GTK_IS_DROP_DOWN (widget)
         || GTK_IS_SEARCH_ENTRY (widget) || GTK_IS_PASSWORD_ENTRY (widget);
}

static gboolean
has_name (GtkWidget *widget)
{
  GtkAccessible *acc = GTK_ACCESSIBLE (widget);

  return gtk_test_accessible_has_property (acc, GTK_ACCESSIBLE_PROPERTY_LABEL)
         || gtk_test_accessible_has_relation (acc, GTK_ACCESSIBLE_RELATION_LABELLED_BY);
}

static gboolean
is_named (GtkWidget *widget)
{
  return has_name (widget) || (!shows_value (widget) && has_own_text (widget));
}

/* The text field inside a spin button, an entry or a drop-down takes the
 * focus; the control a person names is the outer widget. */
static GtkWidget *
named_control (GtkWidget *widget)
{
  for (GtkWidget *w = widget; w != NULL; w = gtk_widget_get_parent (w))
    if (shows_value (w))
      return w;
  return widget;
}

static void
check_in (GtkWidget *widget, GHashTable *seen, guint *n_unnamed)
{
  if (!gtk_widget_get_visible (widget) || !gtk_widget_get_child_visible (widget))
    return;
  if (gtk_widget_get_focusable (widget) && gtk_widget_get_can_focus (widget)
      && gtk_widget_is_sensitive (widget) && !GTK_IS_LABEL (widget)
      && !GTK_IS_WINDOW (widget))
    {
      GtkWidget *control = named_control (widget);
      if (g_hash_table_add (seen, control) && !is_named (control))
        {
          const char *name = gtk_buildable_get_buildable_id (GTK_BUILDABLE (control));
          GtkWidget *parent = gtk_widget_get_parent (control);
          printf ("UNLABELLED %s %s in %s\n", G_OBJECT_TYPE_NAME (control),
                  name != NULL && name[0] != '\0' ? name : "-",
                  parent != NULL ? G_OBJECT_TYPE_NAME (parent) : "-");
          (*n_unnamed)++;
        }
    }
  for (GtkWidget *c = gtk_widget_get_first_child (widget); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    check_in (c, seen, n_unnamed);
}

guint
hl_a11y_check (GtkWidget *root)
{
  g_autoptr(GHashTable) seen = g_hash_table_new (NULL, NULL);
  guint n_unnamed = 0;

  check_in (root, seen, &n_unnamed);
  printf ("A11Y %u unlabelled\n", n_unnamed);
  fflush (stdout);
  return n_unnamed;
}

int
hl_a11y_run_test_hooks (GtkWidget *root)
{
  int status = 0;

  if (env_set ("HIPLEVER_TEST_PRINT_LABELS"))
    hl_a11y_print_labels (root);
  if (env_set ("HIPLEVER_TEST_CHECK_A11Y") && hl_a11y_check (root) > 0)
    status = 1;
  return status;
}

/* The caption of a control in a form grid is the nearest label to its
 * left in the same row or, for a control as wide as its row, the label
 * right above it. */
static GtkWidget *
grid_caption (GtkGrid *grid, GtkWidget *control)
{
  int column, row, best_column = -1;
  GtkWidget *best = NULL, *above = NULL;

  gtk_grid_query_child (grid, control, &column, &row, NULL, NULL);
  for (GtkWidget *c = gtk_widget_get_first_child (GTK_WIDGET (grid)); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    {
      int c_column, c_row;
      if (!GTK_IS_LABEL (c))
        continue;
      gtk_grid_query_child (grid, c, &c_column, &c_row, NULL, NULL);
      if (c_row == row && c_column < column && c_column > best_column)
        {
          best = c;
          best_column = c_column;
        }
      else if (c_row == row - 1 && c_column == column)
        above = c;
    }
  return best != NULL ? best : above;
}

/* In a box, the caption is the label just before the control. */
static GtkWidget *
box_caption (GtkWidget *control)
{
  GtkWidget *prev = gtk_widget_get_prev_sibling (control);

  return GTK_IS_LABEL (prev) ? prev : NULL;
}

static void
label_controls_in (GtkWidget *widget)
{
  GtkWidget *parent = gtk_widget_get_parent (widget);

  if (shows_value (widget) && !has_name (widget))
    {
      GtkWidget *caption = GTK_IS_GRID (parent) ? grid_caption (GTK_GRID (parent), widget)
                           : GTK_IS_BOX (parent) ? box_caption (widget)
                           : NULL;
      if (caption != NULL)
        gtk_accessible_update_relation (GTK_ACCESSIBLE (widget),
                                        GTK_ACCESSIBLE_RELATION_LABELLED_BY, caption, NULL,
                                        -1);
    }
  for (GtkWidget *c = gtk_widget_get_first_child (widget); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    label_controls_in (c);
}

void
hl_a11y_label_controls (GtkWidget *root)
{
  label_controls_in (root);
}
