/* hl-export.c: the window's report, figure, sweep-table and print actions.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-export"

#include <stdlib.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-analysis-panel.h"
#include "hl-export.h"
#include "hl-path.h"
#include "hl-plan-io.h"
#include "hl-render.h"
#include "hl-report.h"
#include "hl-settings.h"
#include "hl-underlay.h"
#include "hl-version.h"
#include "hl-message.h"

#define EXPORT_KEY "hl-export"
/* Comment lines of a CSV file wrap at this many characters. */
#define CSV_COMMENT_WIDTH 76
#define DIALOG_SPACING 8
#define DIALOG_MARGIN 14
#define FIGURE_SIZE_STEP 50
/* The report chooser's choice: the radiograph under the schematic. */
#define UNDERLAY_CHOICE "underlay"
#define FIGURE_SIZE_PAGE 200

typedef enum {
  EXPORT_REPORT,
  EXPORT_FIGURE,
  EXPORT_SWEEPS,
} HlExportKind;

typedef struct {
  GtkWindow *window;           /* borrowed: the export lives on the window */
  HlDocument *document;        /* borrowed: the window's */
  HlAnalysisPanel *analysis;   /* borrowed: its joint-load target */
  HlRadiographPage *radiograph; /* borrowed: the radiograph as the window shows it */
  GtkNativeDialog *chooser;
  GtkWidget *size_dialog;
  GtkWidget *width_spin;
  GtkWidget *height_spin;
  GtkWidget *option_drop;
  GtkWidget *preset_drop;
  GtkWidget *underlay_check;
  int figure_width;
  int figure_height;
  int figure_option;           /* -1 native, else an option index */
  HlRenderPreset figure_preset;
  gboolean figure_underlay;    /* the radiograph under the figure, when there is one */
  gboolean report_underlay;    /* ... under the report's schematic (the chooser's choice) */
  HlReport *print_report;      /* while a print runs */
  HlUnderlay *print_underlay;  /* its copy of the window's radiograph */
  GtkPrintOperation *print_op;
  gboolean print_to_file;      /* the test hook's export, not a printer */
} HlExport;

static void
hl_export_free (gpointer data)
{
  HlExport *ex = data;

  if (ex->chooser != NULL)
    {
      gtk_native_dialog_destroy (ex->chooser);
      g_clear_object (&ex->chooser);
    }
  g_clear_pointer (&ex->print_report, hl_report_free);
  g_clear_pointer (&ex->print_underlay, hl_underlay_free);
  g_clear_object (&ex->print_op);
  g_free (ex);
}

/* ---- helpers -------------------------------------------------------- */

static void
show_failure (HlExport *ex, GFile *file, const char *what, const HlError *err)
{
  g_autofree char *name = g_file_get_parse_name (file);
  g_autofree char *primary = g_strdup_printf (_("Could not export the %s to “%s”"), what, name);
  g_autofree char *msg = hl_document_format_error (err);
  g_autofree char *secondary = g_strdup_printf (_("%s\n\nNothing was written; the plan is unchanged."),
                                                msg);

  hl_message_show_error (GTK_WIDGET (ex->window), primary, secondary);
}

/* `note`: why the radiograph asked for is left out, or NULL. */
static void
say_written (HlExport *ex, const char *what, GFile *file, const HlError *note)
{
  g_autofree char *name = g_file_get_parse_name (file);
  g_autofree char *text = NULL;

  if (note != NULL)
    text = g_strdup_printf (_("%s written to %s, without the radiograph: %s"), what, name,
                            note->message);
  else
    text = g_strdup_printf (_("%s written to %s"), what, name);
  hl_message_show_status (GTK_WIDGET (ex->window), text);
}

/* The plan's radiograph for an export when asked for and the plan has
 * one: the window's, already decoded and checked (borrowed, *owned
 * FALSE), else read from its file now (while the window's still loads;
 * *owned TRUE); NULL otherwise, and *left_out set with the reason in
 * `note` when it was asked for but cannot be drawn. */
static HlUnderlay *
export_underlay (HlExport *ex, const HlPlan *plan, gboolean asked, gboolean *left_out,
                 HlError *note, gboolean *owned)
{
  HlUnderlay *underlay = NULL;

  hl_error_clear (note);
  *left_out = FALSE;
  *owned = FALSE;
  if (asked && plan->radiograph.present)
    {
      underlay = ex->radiograph != NULL ? hl_radiograph_page_get_underlay (ex->radiograph) : NULL;
      if (underlay == NULL)
        {
          underlay = hl_underlay_for_plan (plan, note);
          *owned = underlay != NULL;
        }
      *left_out = underlay == NULL;
    }
  return underlay;
}

/* A report with the window's radiograph when it has it in memory. */
static HlReport *
export_report_new (HlExport *ex, const HlReportSettings *settings, HlError *err)
{
  const HlPlan *plan = hl_document_get_plan (ex->document);
  HlUnderlay *shown = settings->underlay && ex->radiograph != NULL
                        ? hl_radiograph_page_get_underlay (ex->radiograph) : NULL;

  return hl_report_new_with_underlay (plan, settings, shown, err);
}

static char *
suggested_name (HlExport *ex, const char *suffix)
{
  const HlPlan *plan = hl_document_get_plan (ex->document);

  return hl_path_suggested_name (plan->label, _("case"), suffix);
}

/* Adds `ext` when the name has no extension of that kind
 * (hl_path_with_extension, the one rule for every file the window writes). */
GFile *
hl_export_with_extension (GFile *file, const char *ext)
{
  g_autofree char *base = g_file_get_basename (file);
  g_autofree char *name = base != NULL ? hl_path_with_extension (base, ext) : NULL;
  g_autoptr(GFile) parent = NULL;

  if (name == NULL || strcmp (name, base) == 0)
    return g_object_ref (file);
  parent = g_file_get_parent (file);
  return parent != NULL ? g_file_get_child (parent, name) : g_file_new_for_path (name);
}

static GtkFileFilter *
filter_new (const char *name, const char *pattern)
{
  GtkFileFilter *filter = gtk_file_filter_new ();

  gtk_file_filter_set_name (filter, name);
  gtk_file_filter_add_pattern (filter, pattern);
  return filter;
}

static void
report_settings (HlExport *ex, HlReportSettings *settings)
{
  hl_report_settings_init (settings);
  settings->target_jrf_bw = hl_analysis_panel_get_target_bw (ex->analysis);
  /* The document keeps the selection within its options. */
  settings->figure_option = hl_document_get_selected_option (ex->document);
  settings->underlay = ex->report_underlay;
}

static char *
local_path (GFile *file, HlError *err)
{
  char *path = g_file_get_path (file);

  if (path == NULL)
    hl_error_set (err, HL_ERR_IO, "file", "%s", _("only local files can be written"));
  return path;
}

/* ---- the sweep table ------------------------------------------------ */

static void
append_comment (GString *s, const char *text)
{
  g_auto(GStrv) words = g_strsplit (text, " ", -1);
  gsize line = 0;

  g_string_append (s, "#");
  for (guint i = 0; words[i] != NULL; i++)
    {
      gsize len = g_utf8_strlen (words[i], -1);

      if (len == 0)
        continue;
      if (line > 0 && line + 1 + len > CSV_COMMENT_WIDTH)
        {
          g_string_append (s, "\n#");
          line = 0;
        }
      g_string_append_c (s, ' ');
      g_string_append (s, words[i]);
      line += 1 + len;
    }
  g_string_append_c (s, '\n');
}

char *
hl_export_sweeps_csv (const HlPlan *plan, HlError *err)
{
  HlReportSettings settings;
  HlReport *report;
  GString *s;
  char *csv = NULL;
  size_t size = 0;
  g_autofree char *who = NULL;

  hl_report_settings_init (&settings);
  /* The table carries the curves, not the bands. */
  settings.uncertainty = false;
  report = hl_report_new (plan, &settings, err);
  if (report == NULL)
    return NULL;
  if (hl_report_sweeps_csv (report, &csv, &size, err) != HL_OK)
    {
      hl_report_free (report);
      return NULL;
    }
  hl_report_free (report);

  s = g_string_sized_new (size + 1024);
  who = g_strdup_printf (_("hiplever %s: chart sweeps of “%s”, native and every option (units in the column names; xBW: multiples of body weight)."),
                         hl_program_version (), plan->label);
  append_comment (s, who);
  append_comment (s, hl_caution_text ());
  g_string_append_len (s, csv, (gssize) size);
  free (csv);
  return g_string_free (s, FALSE);
}

/* ---- choosing a file ------------------------------------------------ */

static void
write_file (HlExport *ex, HlExportKind kind, GFile *chosen, GtkFileFilter *filter)
{
  g_autoptr(GFile) file = NULL;
  g_autofree char *path = NULL;
  const char *what = NULL;
  const char *done = NULL;
  HlError err, note;
  gboolean left_out = FALSE;

  hl_error_clear (&err);
  hl_error_clear (&note);
  switch (kind)
    {
    case EXPORT_REPORT:
      {
        HlReportSettings settings;
        HlReport *report = NULL;

        what = _("report");
        done = _("Report");
        file = hl_export_with_extension (chosen, ".pdf");
        report_settings (ex, &settings);
        if ((path = local_path (file, &err)) != NULL
            && !hl_document_output_is_input (ex->document, path, FALSE, &err)
            && (report = export_report_new (ex, &settings, &err)) != NULL)
          {
            unsigned char *pdf = NULL;
            size_t size = 0;
            const HlError *why = hl_report_underlay_note (report);

            if (why != NULL)
              {
                note = *why;
                left_out = TRUE;
              }
            if (hl_report_pdf_to_buffer (report, &pdf, &size, &err) == HL_OK)
              hl_write_file_atomic (path, pdf, size, &err);
            free (pdf);
            hl_report_free (report);
          }
      }
      break;
    case EXPORT_FIGURE:
      {
        g_autofree char *base = g_file_get_basename (chosen);
        HlFigureFormat format;
        const char *filter_name = filter != NULL ? gtk_file_filter_get_name (filter) : NULL;

        what = _("figure");
        done = _("Figure");
        /* No known extension: the one of the filter chosen, else PNG. */
        if (base != NULL && hl_figure_format_from_path (base, &format))
          file = g_object_ref (chosen);
        else
          file = hl_export_with_extension (chosen, filter_name != NULL && strstr (filter_name, "SVG") != NULL
                                         ? ".svg" : ".png");
        if ((path = local_path (file, &err)) != NULL
            && !hl_document_output_is_input (ex->document, path, FALSE, &err))
          {
            const HlPlan *plan = hl_document_get_plan (ex->document);
            gboolean owned;
            HlUnderlay *underlay = export_underlay (ex, plan, ex->figure_underlay, &left_out,
                                                    &note, &owned);

            hl_figure_save_preset (plan, ex->figure_option, ex->figure_width,
                                   ex->figure_height, ex->figure_preset, underlay, path, &err);
            if (owned)
              hl_underlay_free (underlay);
          }
      }
      break;
    case EXPORT_SWEEPS:
    default:
      {
        g_autofree char *csv = NULL;

        what = _("sweep table");
        done = _("Sweep table");
        file = hl_export_with_extension (chosen, ".csv");
        if ((path = local_path (file, &err)) != NULL
            && !hl_document_output_is_input (ex->document, path, FALSE, &err)
            && (csv = hl_export_sweeps_csv (hl_document_get_plan (ex->document), &err)) != NULL)
          hl_write_file_atomic (path, csv, strlen (csv), &err);
      }
      break;
    }
  if (err.status != HL_OK)
    show_failure (ex, file, what, &err);
  else
    say_written (ex, done, file, left_out ? &note : NULL);
}

static void
chooser_response_cb (GtkNativeDialog *dialog, int response, HlExport *ex)
{
  HlExportKind kind = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (dialog), "hl-export-kind"));
  g_autoptr(GFile) chosen = NULL;
  g_autoptr(GtkFileFilter) filter = NULL;

  if (response == GTK_RESPONSE_ACCEPT)
    {
      chosen = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (dialog));
      filter = gtk_file_chooser_get_filter (GTK_FILE_CHOOSER (dialog));
      if (g_object_get_data (G_OBJECT (dialog), UNDERLAY_CHOICE) != NULL)
        {
          const char *choice = gtk_file_chooser_get_choice (GTK_FILE_CHOOSER (dialog),
                                                            UNDERLAY_CHOICE);

          ex->report_underlay = choice != NULL && strcmp (choice, "true") == 0;
        }
    }
  if (ex->chooser == dialog)
    {
      gtk_native_dialog_destroy (dialog);
      g_clear_object (&ex->chooser);
    }
  if (chosen != NULL)
    write_file (ex, kind, chosen, filter);
}

static void
choose_file (HlExport *ex, HlExportKind kind)
{
  GtkFileChooserNative *chooser;
  g_autofree char *name = NULL;
  const char *title;

  switch (kind)
    {
    case EXPORT_REPORT:
      title = _("Export the Report");
      name = suggested_name (ex, "-report.pdf");
      break;
    case EXPORT_FIGURE:
      title = _("Export the Figure");
      name = suggested_name (ex, "-figure.png");
      break;
    case EXPORT_SWEEPS:
    default:
      title = _("Export the Sweeps");
      name = suggested_name (ex, "-sweeps.csv");
      break;
    }
  chooser = gtk_file_chooser_native_new (title, GTK_WINDOW (ex->window),
                                         GTK_FILE_CHOOSER_ACTION_SAVE,
                                         _("_Export"), _("_Cancel"));
  if (kind == EXPORT_REPORT)
    {
      g_autoptr(GtkFileFilter) pdf = filter_new (_("PDF documents (*.pdf)"), "*.pdf");

      gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), pdf);
      if (hl_document_get_plan (ex->document)->radiograph.present)
        {
          gtk_file_chooser_add_choice (GTK_FILE_CHOOSER (chooser), UNDERLAY_CHOICE,
                                       _("Radiograph under the schematic"), NULL, NULL);
          gtk_file_chooser_set_choice (GTK_FILE_CHOOSER (chooser), UNDERLAY_CHOICE,
                                       ex->report_underlay ? "true" : "false");
          g_object_set_data (G_OBJECT (chooser), UNDERLAY_CHOICE, GINT_TO_POINTER (1));
        }
    }
  else if (kind == EXPORT_FIGURE)
    {
      g_autoptr(GtkFileFilter) png = filter_new (_("PNG images (*.png)"), "*.png");
      g_autoptr(GtkFileFilter) svg = filter_new (_("SVG drawings (*.svg)"), "*.svg");

      gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), png);
      gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), svg);
    }
  else
    {
      g_autoptr(GtkFileFilter) csv = filter_new (_("CSV tables (*.csv)"), "*.csv");

      gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), csv);
    }
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (chooser), name);
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (chooser), TRUE);
  g_object_set_data (G_OBJECT (chooser), "hl-export-kind", GINT_TO_POINTER (kind));
  hl_settings_track_chooser (chooser);
  g_signal_connect (chooser, "response", G_CALLBACK (chooser_response_cb), ex);
  if (ex->chooser != NULL)
    {
      gtk_native_dialog_destroy (ex->chooser);
      g_clear_object (&ex->chooser);
    }
  ex->chooser = GTK_NATIVE_DIALOG (chooser);
  gtk_native_dialog_show (ex->chooser);
}

/* ---- the figure's size ---------------------------------------------- */

/* The rows of the size drop-down: a size of one's own, then the presets of
 * `hiplever-cli figure --preset` (hl_render_preset_size). */
static const HlRenderPreset preset_rows[] = {
  HL_RENDER_PRESET_AUTO, HL_RENDER_PRESET_SLIDE, HL_RENDER_PRESET_HALF_SLIDE,
};

static HlRenderPreset
preset_of_row (guint row)
{
  return row < G_N_ELEMENTS (preset_rows) ? preset_rows[row] : HL_RENDER_PRESET_AUTO;
}

static guint
row_of_preset (HlRenderPreset preset)
{
  for (guint i = 0; i < G_N_ELEMENTS (preset_rows); i++)
    if (preset_rows[i] == preset)
      return i;
  return 0;
}

/* A preset fixes the size: the fields show it and wait. */
static void
preset_changed_cb (GtkDropDown *drop, GParamSpec *pspec, HlExport *ex)
{
  HlRenderPreset preset = preset_of_row (gtk_drop_down_get_selected (drop));
  gboolean own = preset == HL_RENDER_PRESET_AUTO;

  if (!own)
    {
      int w = ex->figure_width, h = ex->figure_height;

      hl_render_preset_size (preset, &w, &h);
      gtk_spin_button_set_value (GTK_SPIN_BUTTON (ex->width_spin), w);
      gtk_spin_button_set_value (GTK_SPIN_BUTTON (ex->height_spin), h);
    }
  gtk_widget_set_sensitive (ex->width_spin, own);
  gtk_widget_set_sensitive (ex->height_spin, own);
}

static void
size_dialog_response_cb (GtkDialog *dialog, int response, HlExport *ex)
{
  if (response == GTK_RESPONSE_ACCEPT)
    {
      gtk_spin_button_update (GTK_SPIN_BUTTON (ex->width_spin));
      gtk_spin_button_update (GTK_SPIN_BUTTON (ex->height_spin));
      ex->figure_width = gtk_spin_button_get_value_as_int (GTK_SPIN_BUTTON (ex->width_spin));
      ex->figure_height = gtk_spin_button_get_value_as_int (GTK_SPIN_BUTTON (ex->height_spin));
      ex->figure_option = (int) gtk_drop_down_get_selected (GTK_DROP_DOWN (ex->option_drop)) - 1;
      ex->figure_preset = preset_of_row (gtk_drop_down_get_selected (GTK_DROP_DOWN (ex->preset_drop)));
      if (gtk_widget_get_sensitive (ex->underlay_check))
        ex->figure_underlay = gtk_check_button_get_active (GTK_CHECK_BUTTON (ex->underlay_check));
    }
  ex->size_dialog = NULL;
  gtk_window_destroy (GTK_WINDOW (dialog));
  if (response == GTK_RESPONSE_ACCEPT)
    choose_file (ex, EXPORT_FIGURE);
}

static GtkWidget *
size_spin (int value, const char *label)
{
  GtkWidget *spin = gtk_spin_button_new_with_range (HL_FIGURE_SIZE_MIN, HL_FIGURE_SIZE_MAX,
                                                    FIGURE_SIZE_STEP);

  gtk_spin_button_set_increments (GTK_SPIN_BUTTON (spin), FIGURE_SIZE_STEP, FIGURE_SIZE_PAGE);
  GtkEditable *text;

  gtk_spin_button_set_value (GTK_SPIN_BUTTON (spin), value);
  /* Return in a size field accepts the dialog. */
  text = gtk_editable_get_delegate (GTK_EDITABLE (spin));
  if (GTK_IS_TEXT (text))
    gtk_text_set_activates_default (GTK_TEXT (text), TRUE);
  gtk_accessible_update_property (GTK_ACCESSIBLE (spin), GTK_ACCESSIBLE_PROPERTY_LABEL, label, -1);
  return spin;
}

static GtkWidget *
grid_label (const char *text)
{
  GtkWidget *label = gtk_label_new_with_mnemonic (text);

  gtk_label_set_xalign (GTK_LABEL (label), 0.0f);
  return label;
}

static void
show_size_dialog (HlExport *ex)
{
  GtkWindow *window = ex->window;
  const HlPlan *plan = hl_document_get_plan (ex->document);
  g_autoptr(GtkStringList) options = gtk_string_list_new (NULL);
  GtkWidget *dialog, *grid, *label, *note;
  int option = hl_document_get_selected_option (ex->document);

  if (ex->size_dialog != NULL)
    {
      gtk_window_present (GTK_WINDOW (ex->size_dialog));
      return;
    }
  /* GtkDialog is current API in GTK 4.8. */
  dialog = gtk_dialog_new_with_buttons (_("Export Figure"), GTK_WINDOW (window),
                                        GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                        _("_Cancel"), GTK_RESPONSE_CANCEL,
                                        _("Choose _File…"), GTK_RESPONSE_ACCEPT, NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (dialog), GTK_RESPONSE_ACCEPT);
  grid = gtk_grid_new ();
  gtk_grid_set_row_spacing (GTK_GRID (grid), DIALOG_SPACING);
  gtk_grid_set_column_spacing (GTK_GRID (grid), DIALOG_SPACING);
  gtk_widget_set_margin_start (grid, DIALOG_MARGIN);
  gtk_widget_set_margin_end (grid, DIALOG_MARGIN);
  gtk_widget_set_margin_top (grid, DIALOG_MARGIN);
  gtk_widget_set_margin_bottom (grid, DIALOG_MARGIN);

  {
    const char *const sizes[] = {
      _("Size of your own"),
      _("Slide: 1920 x 1080 px (16:9), text at least 24 px"),
      _("Half slide: 960 x 1080 px, text at least 24 px"),
      NULL,
    };

    ex->preset_drop = gtk_drop_down_new_from_strings (sizes);
  }
  gtk_drop_down_set_selected (GTK_DROP_DOWN (ex->preset_drop), row_of_preset (ex->figure_preset));
  label = grid_label (_("_Size"));
  gtk_label_set_mnemonic_widget (GTK_LABEL (label), ex->preset_drop);
  gtk_grid_attach (GTK_GRID (grid), label, 0, 0, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), ex->preset_drop, 1, 0, 2, 1);

  ex->width_spin = size_spin (ex->figure_width, _("Width"));
  ex->height_spin = size_spin (ex->figure_height, _("Height"));
  label = grid_label (_("_Width"));
  gtk_label_set_mnemonic_widget (GTK_LABEL (label), ex->width_spin);
  gtk_grid_attach (GTK_GRID (grid), label, 0, 1, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), ex->width_spin, 1, 1, 1, 1);
  /* The range beside the fields: the spin buttons hold no size outside it. */
  char *range = g_strdup_printf (_("px (SVG: pt), %d to %d"), HL_FIGURE_SIZE_MIN,
                                 HL_FIGURE_SIZE_MAX);
  gtk_grid_attach (GTK_GRID (grid), grid_label (range), 2, 1, 1, 1);
  label = grid_label (_("_Height"));
  gtk_label_set_mnemonic_widget (GTK_LABEL (label), ex->height_spin);
  gtk_grid_attach (GTK_GRID (grid), label, 0, 2, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), ex->height_spin, 1, 2, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), grid_label (range), 2, 2, 1, 1);
  g_free (range);
  g_signal_connect (ex->preset_drop, "notify::selected", G_CALLBACK (preset_changed_cb), ex);
  preset_changed_cb (GTK_DROP_DOWN (ex->preset_drop), NULL, ex);

  gtk_string_list_append (options, _("Native hip alone"));
  for (size_t i = 0; i < plan->n_options; i++)
    gtk_string_list_append (options, plan->options[i].name);
  ex->option_drop = gtk_drop_down_new (G_LIST_MODEL (g_object_ref (options)), NULL);
  gtk_drop_down_set_selected (GTK_DROP_DOWN (ex->option_drop), (guint) (option + 1));
  label = grid_label (_("_Drawn over the native hip"));
  gtk_label_set_mnemonic_widget (GTK_LABEL (label), ex->option_drop);
  gtk_grid_attach (GTK_GRID (grid), label, 0, 3, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), ex->option_drop, 1, 3, 2, 1);

  /* On by default when the plan has a radiograph; without one there is
   * nothing to choose. */
  ex->underlay_check = gtk_check_button_new_with_mnemonic (_("_Radiograph under the drawing, with its window and calibration"));
  gtk_check_button_set_active (GTK_CHECK_BUTTON (ex->underlay_check),
                               plan->radiograph.present && ex->figure_underlay);
  gtk_widget_set_sensitive (ex->underlay_check, plan->radiograph.present);
  if (!plan->radiograph.present)
    gtk_widget_set_tooltip_text (ex->underlay_check, _("The plan has no radiograph."));
  gtk_grid_attach (GTK_GRID (grid), ex->underlay_check, 0, 4, 3, 1);

  note = gtk_label_new (_("The schematic with the force vectors, light style, with the caution at its foot. The format follows the file name: .png or .svg."));
  gtk_label_set_wrap (GTK_LABEL (note), TRUE);
  gtk_label_set_max_width_chars (GTK_LABEL (note), 50);
  gtk_label_set_xalign (GTK_LABEL (note), 0.0f);
  gtk_widget_add_css_class (note, "dim-label");
  gtk_grid_attach (GTK_GRID (grid), note, 0, 5, 3, 1);
  gtk_box_append (GTK_BOX (gtk_dialog_get_content_area (GTK_DIALOG (dialog))), grid);

  g_signal_connect (dialog, "response", G_CALLBACK (size_dialog_response_cb), ex);
  ex->size_dialog = dialog;
  /* Return accepts at once: the focus starts in the width (which
   * activates the default), or on the button when a preset fixes the size. */
  gtk_window_set_focus (GTK_WINDOW (dialog),
                        ex->figure_preset == HL_RENDER_PRESET_AUTO
                        ? ex->width_spin
                        : gtk_dialog_get_widget_for_response (GTK_DIALOG (dialog),
                                                              GTK_RESPONSE_ACCEPT));
  gtk_window_present (GTK_WINDOW (dialog));
}

/* ---- printing ------------------------------------------------------- */

static void
begin_print_cb (GtkPrintOperation *op, GtkPrintContext *context, HlExport *ex)
{
  gtk_print_operation_set_n_pages (op, hl_report_n_pages (ex->print_report));
}

static void
draw_page_cb (GtkPrintOperation *op, GtkPrintContext *context, int page, HlExport *ex)
{
  cairo_t *cr = gtk_print_context_get_cairo_context (context);
  double w = gtk_print_context_get_width (context);
  double h = gtk_print_context_get_height (context);
  double scale = MIN (w / HL_REPORT_PAGE_WIDTH_PT, h / HL_REPORT_PAGE_HEIGHT_PT);

  if (ex->print_report == NULL || !(scale > 0.0))
    return;
  cairo_save (cr);
  /* Centred in the printable area, the A4 page's proportions kept. */
  cairo_translate (cr, (w - scale * HL_REPORT_PAGE_WIDTH_PT) / 2.0,
                   (h - scale * HL_REPORT_PAGE_HEIGHT_PT) / 2.0);
  cairo_scale (cr, scale, scale);
  hl_report_draw_page (ex->print_report, cr, page);
  cairo_restore (cr);
}

/* The status after printing, with why the radiograph is left out when it
 * is (before the report is dropped). */
static void
print_status (HlExport *ex, const char *done)
{
  const HlError *note = ex->print_report != NULL ? hl_report_underlay_note (ex->print_report)
                                                 : NULL;
  g_autofree char *text = note != NULL
                          ? g_strdup_printf (_("%s, without the radiograph: %s"), done,
                                             note->message)
                          : g_strdup (done);

  hl_message_show_status (GTK_WIDGET (ex->window), text);
}

static void
print_done_cb (GtkPrintOperation *op, GtkPrintOperationResult result, HlExport *ex)
{
  if (result == GTK_PRINT_OPERATION_RESULT_APPLY)
    print_status (ex, ex->print_to_file ? _("Report printed to a file")
                                        : _("Report sent to the printer"));
  g_clear_pointer (&ex->print_report, hl_report_free);
  g_clear_pointer (&ex->print_underlay, hl_underlay_free);
  g_clear_object (&ex->print_op);
  if (result == GTK_PRINT_OPERATION_RESULT_ERROR)
    {
      g_autoptr(GError) error = NULL;

      gtk_print_operation_get_error (op, &error);
      hl_message_show_error (GTK_WIDGET (ex->window), _("Could not print the report"),
                            error != NULL ? error->message : _("The printing system gave no reason."));
    }
}

static void
print_report (HlExport *ex)
{
  GtkWindow *window = ex->window;
  GtkPrintOperation *op;
  g_autoptr(GtkPageSetup) setup = NULL;
  g_autoptr(GError) error = NULL;
  GtkPaperSize *a4;
  HlReportSettings settings;
  GtkPrintOperationAction action = GTK_PRINT_OPERATION_ACTION_PRINT_DIALOG;
  GtkPrintOperationResult result;
#if HL_TEST_HOOKS
  const char *export_to = g_getenv ("HIPLEVER_TEST_PRINT_TO");
#else
  const char *export_to = NULL;
#endif
  HlError err;

  if (ex->print_report != NULL)
    return;
  hl_error_clear (&err);
  report_settings (ex, &settings);
  /* A print runs on after this returns, while the window may load another
   * image: the report draws from a copy of the one shown. */
  if (settings.underlay && ex->radiograph != NULL)
    ex->print_underlay = hl_underlay_copy (hl_radiograph_page_get_underlay (ex->radiograph));
  ex->print_report = hl_report_new_with_underlay (hl_document_get_plan (ex->document),
                                                  &settings, ex->print_underlay, &err);
  if (ex->print_report == NULL)
    {
      g_autofree char *msg = hl_document_format_error (&err);

      g_clear_pointer (&ex->print_underlay, hl_underlay_free);
      hl_message_show_error (GTK_WIDGET (window), _("Could not print the report"), msg);
      return;
    }


  /* Kept until "done": an operation with a dialog runs on after this returns. */
  op = ex->print_op = gtk_print_operation_new ();
  setup = gtk_page_setup_new ();
  a4 = gtk_paper_size_new (GTK_PAPER_NAME_A4);
  gtk_page_setup_set_paper_size_and_default_margins (setup, a4);
  gtk_paper_size_free (a4);
  gtk_print_operation_set_default_page_setup (op, setup);
  gtk_print_operation_set_job_name (op, hl_document_get_plan (ex->document)->label[0] != '\0' ? hl_document_get_plan (ex->document)->label
                                                                       : _("hiplever report"));
  gtk_print_operation_set_allow_async (op, TRUE);
  g_signal_connect (op, "begin-print", G_CALLBACK (begin_print_cb), ex);
  g_signal_connect (op, "draw-page", G_CALLBACK (draw_page_cb), ex);
  g_signal_connect (op, "done", G_CALLBACK (print_done_cb), ex);
  ex->print_to_file = FALSE;
  if (export_to != NULL && export_to[0] != '\0')
    {
      ex->print_to_file = TRUE;
      action = GTK_PRINT_OPERATION_ACTION_EXPORT;
      gtk_print_operation_set_export_filename (op, export_to);
    }
  /* "done" may come before run returns, and drops the operation. */
  g_object_ref (op);
  result = gtk_print_operation_run (op, action, GTK_WINDOW (window), &error);
  g_object_unref (op);
  if (result == GTK_PRINT_OPERATION_RESULT_ERROR)
    {
      g_clear_pointer (&ex->print_report, hl_report_free);
      g_clear_pointer (&ex->print_underlay, hl_underlay_free);
      g_clear_object (&ex->print_op);
      hl_message_show_error (GTK_WIDGET (window), _("Could not print the report"),
                            error != NULL ? error->message : _("The printing system gave no reason."));
    }
}

/* ---- actions -------------------------------------------------------- */

static void
export_report_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  choose_file (user_data, EXPORT_REPORT);
}

static void
export_figure_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  show_size_dialog (user_data);
}

static void
export_sweeps_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  choose_file (user_data, EXPORT_SWEEPS);
}

static void
print_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  print_report (user_data);
}

static const GActionEntry export_actions[] = {
  { "export-report", export_report_cb, NULL, NULL, NULL, { 0 } },
  { "export-figure", export_figure_cb, NULL, NULL, NULL, { 0 } },
  { "export-sweeps", export_sweeps_cb, NULL, NULL, NULL, { 0 } },
  { "print", print_cb, NULL, NULL, NULL, { 0 } },
};

void
hl_export_attach (GtkApplicationWindow *window, HlDocument *document,
                  HlAnalysisPanel *analysis, HlRadiographPage *radiograph)
{
  HlExport *ex = g_new0 (HlExport, 1);

  g_return_if_fail (HL_IS_DOCUMENT (document));
  ex->window = GTK_WINDOW (window);
  ex->document = document;
  ex->analysis = analysis;
  ex->radiograph = radiograph;
  ex->figure_width = HL_EXPORT_FIGURE_WIDTH_DEFAULT;
  ex->figure_height = HL_EXPORT_FIGURE_HEIGHT_DEFAULT;
  ex->figure_option = -1;
  ex->figure_preset = HL_RENDER_PRESET_AUTO;
  ex->figure_underlay = TRUE;
  ex->report_underlay = TRUE;
  g_object_set_data_full (G_OBJECT (window), EXPORT_KEY, ex, hl_export_free);
  g_action_map_add_action_entries (G_ACTION_MAP (window), export_actions,
                                   G_N_ELEMENTS (export_actions), ex);
}
