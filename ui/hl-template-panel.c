/* hl-template-panel.c: catalogue, implants, readouts, suggestions, ranking.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The panel computes nothing itself: readouts, suggestions and the
 * ranking are the core's (hl-template.h, hl-fit.h); edits go through
 * hl_template_edit (hl-template-tool.h), one undo step each.
 */
#define G_LOG_DOMAIN "hl-template-panel"

#include "config.h"

#include <math.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-fit.h"
#include "hl-settings.h"
#include "hl-template-panel.h"
#include "hl-template-shape.h"
#include "hl-template-tool.h"
#include "hl-worker.h"

/* Rows of the ranking shown: the best few are what a surgeon compares. */
#define RANK_ROWS_SHOWN 8
#define RANK_COLS 12
/* While a template is dragged, a new ranking starts at most this often
 * (ms): the rows stay readable and the frames fast. */
#define RANK_DRAG_INTERVAL_MS 100

enum { DD_CUP_SIZE, DD_LINER, DD_STEM_SIZE, DD_VERSION, DD_HEAD, N_DD };

typedef struct {
  HlDocument *document;
  GtkWidget *box;
  GtkWidget *banner;
  /* manual */
  GtkWidget *manual_box;
  GtkWidget *catalogue_drop, *cup_family_drop, *stem_family_drop;
  GtkWidget *place_button;
  GtkWindow *window;
  char *load_problems;       /* catalogue files that failed to load */
  GtkWidget *reapply_button; /* a templated option left unresolved */
  GtkFileChooserNative *chooser;
  /* templated */
  GtkWidget *tmpl_box;
  GtkWidget *families_label;
  GtkWidget *drop[N_DD];
  GtkWidget *readouts;       /* a grid: name, value per row */
  GtkWidget *readout_value[4 + HL_CANAL_LEVELS];
  GtkWidget *cup_suggestion, *cup_apply;
  GtkWidget *stem_suggestion, *stem_apply;
  GtkWidget *rank_grid;
  GtkWidget *rank_note;
  char built_key[256];       /* what the lists were built for */
  guint syncing;
  /* the ranking */
  HlFitTable table;          /* shown */
  guint64 table_revision;    /* `state` the table was ranked for */
  guint64 state;             /* bumped on every change of the plan */
  gboolean running, pending;
  double rank_ms;
  GtkWidget *manual_button;
  GtkWidget *cells[RANK_ROWS_SHOWN][RANK_COLS];
  GtkWidget *apply[RANK_ROWS_SHOWN];
  gint64 last_start_us;
  guint rank_timeout;
  GFunc changed_func;
  gpointer changed_data;
  HlCupSuggestion cup_sugg;
  gboolean has_cup_sugg;
  HlStemSuggestion stem_sugg;
  gboolean has_stem_sugg;
} Panel;

static Panel *
panel_of (GtkWidget *w)
{
  return g_object_get_data (G_OBJECT (w), "hl-template-panel");
}

static const HlTemplate *
current (Panel *p, int *index)
{
  const HlPlan *plan = hl_document_get_plan (p->document);
  int i = hl_document_get_selected_option (p->document);
  *index = i;
  if (i < 0 || (size_t) i >= plan->n_options)
    return NULL;
  return &plan->options[i].recon.tmpl;
}

/* ---- Lists --------------------------------------------------------------- */

static void
drop_set_strings (GtkWidget *drop, GPtrArray *items)
{
  g_ptr_array_add (items, NULL);
  GtkStringList *list = gtk_string_list_new ((const char *const *) items->pdata);
  gtk_drop_down_set_model (GTK_DROP_DOWN (drop), G_LIST_MODEL (list));
  g_object_unref (list);
}

static GtkWidget *
drop_new (const char *accessible)
{
  GtkWidget *d = gtk_drop_down_new (NULL, NULL);
  gtk_widget_set_hexpand (d, TRUE);
  gtk_accessible_update_property (GTK_ACCESSIBLE (d), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                  accessible, -1);
  return d;
}

static const HlCatalogue *
chosen_catalogue (Panel *p)
{
  const HlCatalogue *list[64];
  size_t n = MIN (hl_catalogue_registry_list (list, G_N_ELEMENTS (list)), G_N_ELEMENTS (list));
  guint i = gtk_drop_down_get_selected (GTK_DROP_DOWN (p->catalogue_drop));
  return i < n ? list[i] : (n > 0 ? list[0] : NULL);
}

static void
fill_families (Panel *p)
{
  const HlCatalogue *cat = chosen_catalogue (p);
  g_autoptr(GPtrArray) cups = g_ptr_array_new_with_free_func (g_free);
  g_autoptr(GPtrArray) stems = g_ptr_array_new_with_free_func (g_free);
  for (size_t i = 0; cat != NULL && i < cat->n_cups; i++)
    g_ptr_array_add (cups, g_strdup (cat->cups[i].label[0] ? cat->cups[i].label : cat->cups[i].id));
  for (size_t i = 0; cat != NULL && i < cat->n_stems; i++)
    g_ptr_array_add (stems, g_strdup_printf ("%s (%s)",
                                             cat->stems[i].label[0] ? cat->stems[i].label
                                                                    : cat->stems[i].id,
                                             cat->stems[i].fixation == HL_FIXATION_CEMENTED
                                             ? _("cemented") : _("cementless")));
  p->syncing++;
  drop_set_strings (p->cup_family_drop, cups);
  drop_set_strings (p->stem_family_drop, stems);
  p->syncing--;
}

static void
fill_catalogues (Panel *p)
{
  const HlCatalogue *list[64];
  size_t n = MIN (hl_catalogue_registry_list (list, G_N_ELEMENTS (list)), G_N_ELEMENTS (list));
  g_autoptr(GPtrArray) items = g_ptr_array_new_with_free_func (g_free);
  for (size_t i = 0; i < n; i++)
    g_ptr_array_add (items, g_strdup_printf ("%s (%s %s)", list[i]->label[0] ? list[i]->label
                                                                            : list[i]->id,
                                             _("version"), list[i]->version));
  p->syncing++;
  drop_set_strings (p->catalogue_drop, items);
  p->syncing--;
  fill_families (p);
}

/* The lists of a templated option, built when the option, its catalogue
 * or families change; only the selections follow other edits. */
static void
build_lists (Panel *p, const HlTemplate *t, const HlCatalogue *cat)
{
  const HlCupFamily *cf = hl_catalogue_cup_family (cat, t->cup_family);
  const HlStemFamily *sf = hl_catalogue_stem_family (cat, t->stem_family);
  GPtrArray *a[N_DD];
  for (int k = 0; k < N_DD; k++)
    a[k] = g_ptr_array_new_with_free_func (g_free);
  for (size_t i = 0; cf != NULL && i < cf->n_sizes; i++)
    g_ptr_array_add (a[DD_CUP_SIZE], g_strdup_printf (_("%.0f mm"), cf->diameters_mm[i]));
  for (size_t i = 0; cf != NULL && i < cf->n_liners; i++)
    g_ptr_array_add (a[DD_LINER], g_strdup_printf (_("%s (+%.1f mm)"), cf->liners[i].id,
                                                   cf->liners[i].lateralisation_mm));
  for (size_t i = 0; sf != NULL && i < sf->n_sizes; i++)
    g_ptr_array_add (a[DD_STEM_SIZE], g_strdup (sf->sizes[i].size));
  for (size_t i = 0; sf != NULL && i < sf->n_versions; i++)
    g_ptr_array_add (a[DD_VERSION], g_strdup_printf (_("%s (%.0f°)"), sf->versions[i].id,
                                                     sf->versions[i].neck_shaft_angle_deg));
  double lengths[32];
  size_t nl = MIN (hl_catalogue_head_lengths (cat, lengths, 32), 32);
  for (size_t i = 0; i < nl; i++)
    g_ptr_array_add (a[DD_HEAD], g_strdup_printf (_("%+.0f mm"), lengths[i]));
  p->syncing++;
  for (int k = 0; k < N_DD; k++)
    {
      drop_set_strings (p->drop[k], a[k]);
      g_ptr_array_unref (a[k]);
    }
  p->syncing--;
  g_autofree char *fam = g_strdup_printf (_("Catalogue %s %s: cup %s, stem %s"), cat->id,
                                          cat->version, t->cup_family, t->stem_family);
  gtk_label_set_text (GTK_LABEL (p->families_label), fam);
}

static void
select_lists (Panel *p, const HlTemplate *t, const HlCatalogue *cat)
{
  const HlCupFamily *cf = hl_catalogue_cup_family (cat, t->cup_family);
  const HlStemFamily *sf = hl_catalogue_stem_family (cat, t->stem_family);
  long sel[N_DD] = { -1, -1, -1, -1, -1 };
  if (cf != NULL)
    {
      sel[DD_CUP_SIZE] = hl_cup_family_size_index (cf, t->cup_diameter_mm);
      for (size_t i = 0; i < cf->n_liners; i++)
        if (strcmp (cf->liners[i].id, t->liner) == 0)
          sel[DD_LINER] = (long) i;
    }
  if (sf != NULL)
    {
      sel[DD_STEM_SIZE] = hl_stem_family_size_index (sf, t->stem_size);
      sel[DD_VERSION] = hl_stem_family_version_index (sf, t->version);
    }
  double lengths[32];
  size_t nl = MIN (hl_catalogue_head_lengths (cat, lengths, 32), 32);
  for (size_t i = 0; i < nl; i++)
    if (fabs (lengths[i] - t->head_length_mm) < 1e-6)
      sel[DD_HEAD] = (long) i;
  p->syncing++;
  for (int k = 0; k < N_DD; k++)
    gtk_drop_down_set_selected (GTK_DROP_DOWN (p->drop[k]),
                                sel[k] >= 0 ? (guint) sel[k] : GTK_INVALID_LIST_POSITION);
  p->syncing--;
}

static void
drop_changed_cb (GtkDropDown *drop, GParamSpec *pspec, Panel *p)
{
  if (p->syncing > 0)
    return;
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL || !cur->on)
    return;
  const HlCatalogue *cat = hl_catalogue_registry_find (cur->catalogue);
  if (cat == NULL)
    return;
  guint i = gtk_drop_down_get_selected (drop);
  if (i == GTK_INVALID_LIST_POSITION)
    return;
  HlTemplate t = *cur;
  const HlCupFamily *cf = hl_catalogue_cup_family (cat, t.cup_family);
  const HlStemFamily *sf = hl_catalogue_stem_family (cat, t.stem_family);
  double lengths[32];
  size_t nl = MIN (hl_catalogue_head_lengths (cat, lengths, 32), 32);
  GtkWidget *w = GTK_WIDGET (drop);
  if (w == p->drop[DD_CUP_SIZE] && cf != NULL && i < cf->n_sizes)
    t.cup_diameter_mm = cf->diameters_mm[i];
  else if (w == p->drop[DD_LINER] && cf != NULL && i < cf->n_liners)
    g_strlcpy (t.liner, cf->liners[i].id, sizeof t.liner);
  else if (w == p->drop[DD_STEM_SIZE] && sf != NULL && i < sf->n_sizes)
    g_strlcpy (t.stem_size, sf->sizes[i].size, sizeof t.stem_size);
  else if (w == p->drop[DD_VERSION] && sf != NULL && i < sf->n_versions)
    g_strlcpy (t.version, sf->versions[i].id, sizeof t.version);
  else if (w == p->drop[DD_HEAD] && i < nl)
    t.head_length_mm = lengths[i];
  else
    return;
  hl_document_break_coalescing (p->document);
  hl_template_edit (p->document, index, &t, NULL);
}

/* ---- Readouts and suggestions ------------------------------------------ */

static void
set_text (GtkWidget *label, const char *text)
{
  if (g_strcmp0 (gtk_label_get_text (GTK_LABEL (label)), text) != 0)
    gtk_label_set_text (GTK_LABEL (label), text);
}

static void
set_mm (GtkWidget *label, double v, const char *missing)
{
  char buf[64];
  if (isfinite (v))
    g_snprintf (buf, sizeof buf, _("%.1f mm"), v);
  set_text (label, isfinite (v) ? buf : missing);
}

static void
sync_readouts (Panel *p, const HlTemplate *t, const HlCatalogue *cat)
{
  const HlPlan *plan = hl_document_get_plan (p->document);
  HlTemplateReadouts r;
  char buf[128];
  hl_template_readouts (plan, t, cat, &r);
  g_snprintf (buf, sizeof buf, _("%.1f° (target zone 30-50°)"), r.inclination_deg);
  set_text (p->readout_value[0], buf);
  set_mm (p->readout_value[1], r.medial_edge_to_ilioischial_mm, _("mark the ilioischial line"));
  set_mm (p->readout_value[2], r.uncovered_lateral_mm, _("mark the acetabular margin"));
  set_mm (p->readout_value[3], r.centre_height_mm, _("mark a teardrop"));
  for (int k = 0; k < HL_CANAL_LEVELS; k++)
    {
      if (!isfinite (r.canal_width_mm[k]))
        g_snprintf (buf, sizeof buf, "%s", _("mark the inner canal edges"));
      else if (isfinite (r.canal_fill_pct[k]))
        g_snprintf (buf, sizeof buf, _("%.0f %% (stem %.1f in %.1f mm)"), r.canal_fill_pct[k],
                    r.body_width_mm[k], r.canal_width_mm[k]);
      else
        g_snprintf (buf, sizeof buf, "%s", _("the stem does not reach it"));
      set_text (p->readout_value[4 + k], buf);
    }

  HlError err;
  hl_error_clear (&err);
  p->has_cup_sugg = hl_template_suggest_cup (plan, t, cat, &p->cup_sugg, &err) == HL_OK;
  set_text (p->cup_suggestion, p->has_cup_sugg ? p->cup_sugg.reason : err.message);
  gtk_widget_set_sensitive (p->cup_apply, p->has_cup_sugg);
  hl_error_clear (&err);
  p->has_stem_sugg = hl_template_suggest_stem (plan, t, cat, &p->stem_sugg, &err) == HL_OK;
  set_text (p->stem_suggestion, p->has_stem_sugg ? p->stem_sugg.reason : err.message);
  gtk_widget_set_sensitive (p->stem_apply, p->has_stem_sugg);
}

static void
cup_apply_cb (GtkButton *b, Panel *p)
{
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL || !cur->on || !p->has_cup_sugg)
    return;
  HlTemplate t = *cur;
  t.cup_diameter_mm = p->cup_sugg.diameter_mm;
  t.cup_x_mm = p->cup_sugg.centre.x;
  t.cup_y_mm = p->cup_sugg.centre.y;
  t.inclination_deg = p->cup_sugg.inclination_deg;
  hl_document_break_coalescing (p->document);
  hl_template_edit (p->document, index, &t, NULL);
}

static void
stem_apply_cb (GtkButton *b, Panel *p)
{
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL || !cur->on || !p->has_stem_sugg)
    return;
  HlTemplate t = *cur;
  g_strlcpy (t.stem_size, p->stem_sugg.size, sizeof t.stem_size);
  hl_document_break_coalescing (p->document);
  hl_template_edit (p->document, index, &t, NULL);
}

/* ---- The ranking ----------------------------------------------------------- */

typedef struct {
  HlPlan *plan;
  size_t option;
  const HlCatalogue *cat;    /* the registry's: never freed */
  guint64 revision;
  HlFitTable table;
  HlError err;
  HlStatus status;
  double ms;
} RankJob;

static void
rank_job_free (gpointer data)
{
  RankJob *job = data;
  hl_plan_free (job->plan);
  hl_fit_table_clear (&job->table);
  g_free (job);
}

static void
rank_thread (GTask *task, gpointer source, gpointer data, GCancellable *cancellable)
{
  RankJob *job = data;
  gint64 t0 = g_get_monotonic_time ();

  hl_worker_lower_priority ();
  hl_error_clear (&job->err);
  job->status = hl_fit_rank (job->plan, job->option, job->cat, 0, &job->table, &job->err);
  job->ms = (g_get_monotonic_time () - t0) / 1000.0;
  g_task_return_boolean (task, TRUE);
}

static void rank_start (Panel *p);
static void rank_show (Panel *p);

static gboolean
rank_timeout_cb (gpointer data)
{
  Panel *p = data;
  p->rank_timeout = 0;
  p->last_start_us = 0;
  rank_start (p);
  return G_SOURCE_REMOVE;
}

static void
rank_done (GObject *source, GAsyncResult *res, gpointer user_data)
{
  GtkWidget *box = GTK_WIDGET (source);
  Panel *p = panel_of (box);
  RankJob *job = g_task_get_task_data (G_TASK (res));
  p->running = FALSE;
  p->rank_ms = job->ms;
  int index;
  const HlTemplate *t = current (p, &index);
  if (t != NULL && t->on && (size_t) index == job->option && job->revision > p->table_revision)
    {
      hl_fit_table_clear (&p->table);
      p->table = job->table;
      memset (&job->table, 0, sizeof job->table);
      p->table_revision = job->revision;
      if (job->status != HL_OK)
        gtk_label_set_text (GTK_LABEL (p->rank_note), job->err.message);
      rank_show (p);
      if (p->changed_func != NULL)
        p->changed_func (p->box, p->changed_data);
    }
  if (p->pending || p->table_revision != p->state)
    {
      p->pending = FALSE;
      rank_start (p);
    }
}

static void
rank_start (Panel *p)
{
  int index;
  const HlTemplate *t = current (p, &index);
  if (t == NULL || !t->on || !t->resolved)
    return;
  if (p->running)
    {
      /* One at a time: the latest state runs when this one ends. */
      p->pending = TRUE;
      return;
    }
  if (p->table_revision == p->state)
    return;
  gint64 now = g_get_monotonic_time ();
  if (hl_document_is_dragging (p->document)
      && now - p->last_start_us < RANK_DRAG_INTERVAL_MS * 1000)
    {
      if (p->rank_timeout == 0)
        p->rank_timeout = g_timeout_add (RANK_DRAG_INTERVAL_MS, rank_timeout_cb, p);
      return;
    }
  p->last_start_us = now;
  RankJob *job = g_new0 (RankJob, 1);
  job->plan = hl_plan_copy (hl_document_get_plan (p->document));
  job->option = (size_t) index;
  job->cat = hl_catalogue_registry_find (t->catalogue);
  job->revision = p->state;
  if (job->plan == NULL || job->cat == NULL)
    {
      rank_job_free (job);
      return;
    }
  p->running = TRUE;
  GTask *task = g_task_new (p->box, NULL, rank_done, NULL);
  g_task_set_task_data (task, job, rank_job_free);
  g_task_run_in_thread (task, rank_thread);
  g_object_unref (task);
}

static gboolean apply_rank (Panel *p, guint rank);

static void
rank_apply_cb (GtkButton *b, Panel *p)
{
  apply_rank (p, GPOINTER_TO_UINT (g_object_get_data (G_OBJECT (b), "rank")));
}

static GtkWidget *
grid_text (GtkWidget *grid, int col, int row, const char *text, gboolean header)
{
  GtkWidget *l = gtk_label_new (text);
  gtk_label_set_xalign (GTK_LABEL (l), header ? 0.0f : 1.0f);
  if (header)
    gtk_widget_add_css_class (l, "caption-heading");
  else
    gtk_widget_add_css_class (l, "numeric");
  gtk_grid_attach (GTK_GRID (grid), l, col, row, 1, 1);
  return l;
}

/* The grid's header, labels and buttons, made once: a ranking that
 * arrives only changes their text. */
static void
rank_grid_build (Panel *p)
{
  static const char *heads[RANK_COLS] = {
    N_("#"), N_("Cup"), N_("Liner"), N_("Stem"), N_("Version"), N_("Head"),
    N_("Leg length"), N_("Offset"), N_("Residual"), N_("Abductor"), N_("Joint"), N_("Joint p95"),
  };
  for (int c = 0; c < RANK_COLS; c++)
    grid_text (p->rank_grid, c + 1, 0, _(heads[c]), TRUE);
  for (int r = 0; r < RANK_ROWS_SHOWN; r++)
    {
      for (int c = 0; c < RANK_COLS; c++)
        p->cells[r][c] = grid_text (p->rank_grid, c + 1, r + 1, "", FALSE);
      GtkWidget *apply = gtk_button_new_with_label (_("Apply"));
      g_autofree char *name = g_strdup_printf (_("Apply combination %d"), r + 1);
      gtk_accessible_update_property (GTK_ACCESSIBLE (apply), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                      name, -1);
      g_object_set_data (G_OBJECT (apply), "rank", GUINT_TO_POINTER ((guint) r + 1));
      g_signal_connect (apply, "clicked", G_CALLBACK (rank_apply_cb), p);
      gtk_grid_attach (GTK_GRID (p->rank_grid), apply, 0, r + 1, 1, 1);
      p->apply[r] = apply;
    }
}

static void
set_cell (GtkWidget *label, const char *text)
{
  if (g_strcmp0 (gtk_label_get_text (GTK_LABEL (label)), text) != 0)
    gtk_label_set_text (GTK_LABEL (label), text);
}

static void
rank_show (Panel *p)
{
  gtk_widget_set_visible (p->rank_grid, p->table.n > 0);
  for (size_t i = 0; i < RANK_ROWS_SHOWN; i++)
    {
      gboolean shown = i < p->table.n;
      for (int c = 0; c < RANK_COLS; c++)
        gtk_widget_set_visible (p->cells[i][c], shown);
      gtk_widget_set_visible (p->apply[i], shown);
      if (!shown)
        continue;
      const HlFitRow *r = &p->table.rows[i];
      char buf[64];
      g_snprintf (buf, sizeof buf, "%zu", r->rank);
      set_cell (p->cells[i][0], buf);
      g_snprintf (buf, sizeof buf, "%.0f", r->tmpl.cup_diameter_mm);
      set_cell (p->cells[i][1], buf);
      set_cell (p->cells[i][2], r->tmpl.liner);
      set_cell (p->cells[i][3], r->tmpl.stem_size);
      set_cell (p->cells[i][4], r->tmpl.version);
      g_snprintf (buf, sizeof buf, "%+.0f", r->tmpl.head_length_mm);
      set_cell (p->cells[i][5], buf);
      g_snprintf (buf, sizeof buf, "%+.1f", r->result.leg_length_change_mm);
      set_cell (p->cells[i][6], buf);
      g_snprintf (buf, sizeof buf, "%+.1f", r->result.global_offset_change_mm);
      set_cell (p->cells[i][7], buf);
      g_snprintf (buf, sizeof buf, "%+.1f / %+.1f", r->leg_length_residual_mm,
                  r->global_offset_residual_mm);
      set_cell (p->cells[i][8], buf);
      g_snprintf (buf, sizeof buf, "%.2f", r->result.abductor_force_bw);
      set_cell (p->cells[i][9], buf);
      g_snprintf (buf, sizeof buf, "%.2f", r->result.jrf_bw);
      set_cell (p->cells[i][10], buf);
      if (isfinite (r->jrf_p95_bw))
        g_snprintf (buf, sizeof buf, "%.2f", r->jrf_p95_bw);
      else
        g_snprintf (buf, sizeof buf, "–");
      set_cell (p->cells[i][11], buf);
    }
  if (p->table.n > 0)
    gtk_label_set_text (GTK_LABEL (p->rank_note),
                        p->table.against_other_hip
                        ? _("Ranked by |leg length residual| + |global offset residual| against the other hip (mm), ties by the lower joint force; residuals leg length / offset in mm, forces in body weights.")
                        : _("Ranked by |leg length change| + |global offset change| against the native hip (mm), ties by the lower joint force; residuals leg length / offset in mm, forces in body weights."));
}

static gboolean
apply_rank (Panel *p, guint rank)
{
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL || !cur->on || rank == 0 || rank > p->table.n
      || p->table.option != (size_t) index)
    return FALSE;
  const HlFitRow *row = &p->table.rows[rank - 1];
  return hl_template_edit (p->document, index, &row->tmpl, NULL);
}

/* ---- Manual and back ------------------------------------------------------- */

static void
place_cb (GtkButton *b, Panel *p)
{
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL)
    return;
  const HlCatalogue *cat = chosen_catalogue (p);
  if (cat == NULL)
    return;
  HlTemplate t;
  HlError err;
  hl_error_clear (&err);
  if (hl_template_place_default (hl_document_get_plan (p->document), cat, &t, &err) != HL_OK)
    {
      g_autofree char *text = hl_document_format_error (&err);
      g_signal_emit_by_name (p->document, "error", _("The option could not be templated"), text);
      return;
    }
  guint ci = gtk_drop_down_get_selected (GTK_DROP_DOWN (p->cup_family_drop));
  guint si = gtk_drop_down_get_selected (GTK_DROP_DOWN (p->stem_family_drop));
  if (ci < cat->n_cups && strcmp (cat->cups[ci].id, t.cup_family) != 0)
    {
      const HlCupFamily *cf = &cat->cups[ci];
      g_strlcpy (t.cup_family, cf->id, sizeof t.cup_family);
      if (cf->n_liners > 0)
        g_strlcpy (t.liner, cf->liners[0].id, sizeof t.liner);
      if (hl_cup_family_size_index (cf, t.cup_diameter_mm) < 0 && cf->n_sizes > 0)
        t.cup_diameter_mm = cf->diameters_mm[cf->n_sizes / 2];
    }
  if (si < cat->n_stems && strcmp (cat->stems[si].id, t.stem_family) != 0)
    {
      const HlStemFamily *sf = &cat->stems[si];
      g_strlcpy (t.stem_family, sf->id, sizeof t.stem_family);
      if (sf->n_versions > 0)
        g_strlcpy (t.version, sf->versions[0].id, sizeof t.version);
      if (sf->n_sizes > 0)
        g_strlcpy (t.stem_size, sf->sizes[sf->n_sizes / 2].size, sizeof t.stem_size);
    }
  hl_document_break_coalescing (p->document);
  hl_template_edit (p->document, index, &t, NULL);
}

static void
manual_cb (GtkButton *b, Panel *p)
{
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL || !cur->on)
    return;
  hl_document_break_coalescing (p->document);
  HlPlan *plan = hl_document_begin_edit (p->document, NULL);
  if (plan == NULL)
    return;
  /* The option keeps the four numbers its implants last gave. */
  plan->options[index].recon.tmpl.on = false;
  hl_document_end_edit (p->document, HL_DOCUMENT_CHANGED_VALUES);
}

/* The user accepts the catalogue as loaded now for an unresolved option. */
static void
reapply_cb (GtkButton *b, Panel *p)
{
  int index;
  const HlTemplate *cur = current (p, &index);
  if (cur == NULL || !cur->on)
    return;
  HlTemplate t = *cur;
  hl_document_break_coalescing (p->document);
  if (hl_template_edit (p->document, index, &t, NULL))
    hl_template_panel_set_warnings (p->box, NULL);
}

static void
catalogue_changed_cb (GtkDropDown *d, GParamSpec *pspec, Panel *p)
{
  if (p->syncing == 0)
    fill_families (p);
}

/* ---- Sync ------------------------------------------------------------------ */

static void
sync_all (Panel *p)
{
  int index;
  const HlTemplate *t = current (p, &index);
  gtk_widget_set_visible (p->box, t != NULL);
  if (t == NULL)
    return;
  gtk_widget_set_visible (p->manual_box, !t->on);
  gtk_widget_set_visible (p->tmpl_box, t->on);
  if (!t->on)
    {
      p->built_key[0] = '\0';
      if (g_list_model_get_n_items (G_LIST_MODEL (gtk_drop_down_get_model (
            GTK_DROP_DOWN (p->catalogue_drop)))) == 0)
        fill_catalogues (p);
      return;
    }
  const HlCatalogue *cat = hl_catalogue_registry_find (t->catalogue);
  gtk_widget_set_visible (p->reapply_button, cat != NULL && !t->resolved);
  if (cat == NULL || !t->resolved)
    {
      set_text (p->families_label,
                _("This option's implants cannot be shown: its catalogue is missing or has changed (see the message above). Its saved numbers stand."));
      return;
    }
  char key[256];
  g_snprintf (key, sizeof key, "%d/%p/%s/%s", index, (const void *) cat, t->cup_family,
              t->stem_family);
  if (strcmp (key, p->built_key) != 0)
    {
      build_lists (p, t, cat);
      g_strlcpy (p->built_key, key, sizeof p->built_key);
      p->table_revision = 0;
      hl_fit_table_clear (&p->table);
      rank_show (p);
    }
  select_lists (p, t, cat);
  sync_readouts (p, t, cat);
  rank_start (p);
}

static void
document_changed_cb (HlDocument *document, guint what, GtkWidget *box)
{
  Panel *p = panel_of (box);
  if (what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_HISTORY
              | HL_DOCUMENT_CHANGED_REPLACED | HL_DOCUMENT_CHANGED_SELECTION))
    p->state++;
  else if (!(what & HL_DOCUMENT_CHANGED_RESULTS))
    return;
  sync_all (p);
}

static void
scrolled_cb (GtkWidget *box)
{
  Panel *p = panel_of (box);
  if (p->changed_func != NULL)
    p->changed_func (p->box, p->changed_data);
}

/* The side panel scrolls: the test hooks print the controls again. */
static void
map_cb (GtkWidget *box, Panel *p)
{
  GtkWidget *sw = gtk_widget_get_ancestor (box, GTK_TYPE_SCROLLED_WINDOW);
  if (sw == NULL || g_object_get_data (G_OBJECT (sw), "hl-template-scroll") != NULL)
    return;
  g_object_set_data (G_OBJECT (sw), "hl-template-scroll", p);
  g_signal_connect_object (gtk_scrolled_window_get_vadjustment (GTK_SCROLLED_WINDOW (sw)),
                           "value-changed", G_CALLBACK (scrolled_cb), box, G_CONNECT_SWAPPED);
}

static GtkWidget *
heading (const char *text)
{
  GtkWidget *l = gtk_label_new (text);
  gtk_label_set_xalign (GTK_LABEL (l), 0.0f);
  gtk_widget_add_css_class (l, "heading");
  return l;
}

static GtkWidget *
wrap_label (void)
{
  GtkWidget *l = gtk_label_new (NULL);
  gtk_label_set_xalign (GTK_LABEL (l), 0.0f);
  gtk_label_set_wrap (GTK_LABEL (l), TRUE);
  gtk_label_set_max_width_chars (GTK_LABEL (l), 44);
  gtk_label_set_selectable (GTK_LABEL (l), FALSE);
  return l;
}

static void
panel_free (gpointer data)
{
  Panel *p = data;
  if (p->chooser != NULL)
    g_object_unref (p->chooser);
  g_free (p->load_problems);
  if (p->rank_timeout != 0)
    g_source_remove (p->rank_timeout);
  hl_fit_table_clear (&p->table);
  g_free (p);
}

GtkWidget *
hl_template_panel_new (HlDocument *document)
{
  Panel *p = g_new0 (Panel, 1);
  p->document = document;
  p->box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  p->state = 1;
  gtk_widget_set_margin_top (p->box, 12);
  g_object_set_data_full (G_OBJECT (p->box), "hl-template-panel", p, panel_free);
  gtk_widget_set_name (p->box, "template-panel");

  gtk_box_append (GTK_BOX (p->box), heading (_("Implants")));
  p->banner = wrap_label ();
  gtk_widget_add_css_class (p->banner, "error");
  gtk_widget_set_visible (p->banner, FALSE);
  gtk_box_append (GTK_BOX (p->box), p->banner);

  /* manual */
  p->manual_box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  GtkWidget *g = gtk_grid_new ();
  gtk_grid_set_column_spacing (GTK_GRID (g), 8);
  gtk_grid_set_row_spacing (GTK_GRID (g), 6);
  const char *mlabels[] = { N_("Catalogue"), N_("Cup family"), N_("Stem family") };
  p->catalogue_drop = drop_new (_("Catalogue"));
  p->cup_family_drop = drop_new (_("Cup family"));
  p->stem_family_drop = drop_new (_("Stem family"));
  GtkWidget *mdrops[] = { p->catalogue_drop, p->cup_family_drop, p->stem_family_drop };
  for (int i = 0; i < 3; i++)
    {
      GtkWidget *l = gtk_label_new (_(mlabels[i]));
      gtk_label_set_xalign (GTK_LABEL (l), 0.0f);
      gtk_grid_attach (GTK_GRID (g), l, 0, i, 1, 1);
      gtk_grid_attach (GTK_GRID (g), mdrops[i], 1, i, 1, 1);
    }
  g_signal_connect (p->catalogue_drop, "notify::selected", G_CALLBACK (catalogue_changed_cb), p);
  gtk_box_append (GTK_BOX (p->manual_box), g);
  p->place_button = gtk_button_new_with_mnemonic (_("_Template this option"));
  gtk_widget_set_name (p->place_button, "template-place");
  gtk_widget_set_tooltip_text (p->place_button,
                               _("Places the catalogue's implants on the radiograph at a first position; the option's numbers then come from them."));
  g_signal_connect (p->place_button, "clicked", G_CALLBACK (place_cb), p);
  gtk_box_append (GTK_BOX (p->manual_box), p->place_button);
  GtkWidget *add = gtk_button_new_with_mnemonic (_("Add a _catalogue file…"));
  gtk_actionable_set_action_name (GTK_ACTIONABLE (add), "win.add-catalogue");
  gtk_box_append (GTK_BOX (p->manual_box), add);
  gtk_box_append (GTK_BOX (p->box), p->manual_box);

  /* templated */
  p->tmpl_box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  p->families_label = wrap_label ();
  gtk_widget_add_css_class (p->families_label, "dim-label");
  gtk_box_append (GTK_BOX (p->tmpl_box), p->families_label);
  g = gtk_grid_new ();
  gtk_grid_set_column_spacing (GTK_GRID (g), 8);
  gtk_grid_set_row_spacing (GTK_GRID (g), 6);
  const char *dlabels[N_DD] = { N_("Cup size"), N_("Liner"), N_("Stem size"), N_("Version"),
                                N_("Head length") };
  for (int k = 0; k < N_DD; k++)
    {
      GtkWidget *l = gtk_label_new (_(dlabels[k]));
      gtk_label_set_xalign (GTK_LABEL (l), 0.0f);
      p->drop[k] = drop_new (_(dlabels[k]));
      g_signal_connect (p->drop[k], "notify::selected", G_CALLBACK (drop_changed_cb), p);
      gtk_grid_attach (GTK_GRID (g), l, 0, k, 1, 1);
      gtk_grid_attach (GTK_GRID (g), p->drop[k], 1, k, 1, 1);
    }
  gtk_box_append (GTK_BOX (p->tmpl_box), g);
  GtkWidget *hint = wrap_label ();
  gtk_label_set_text (GTK_LABEL (hint),
                      _("On the picture: drag the cup, its square lever for the inclination, the stem along the shaft axis. Tab reaches the handles; arrows nudge (Shift: more); Page Up and Page Down change the cup or stem size."));
  gtk_widget_add_css_class (hint, "dim-label");
  gtk_widget_add_css_class (hint, "caption");
  gtk_box_append (GTK_BOX (p->tmpl_box), hint);
  p->reapply_button = gtk_button_new_with_mnemonic (_("_Apply the implants with the catalogue as it is now"));
  gtk_widget_set_tooltip_text (p->reapply_button,
                               _("The option's numbers are derived again from its implants in the catalogue now loaded, and the plan records that catalogue."));
  g_signal_connect (p->reapply_button, "clicked", G_CALLBACK (reapply_cb), p);
  gtk_box_append (GTK_BOX (p->tmpl_box), p->reapply_button);
  GtkWidget *manual = gtk_button_new_with_mnemonic (_("Back to _manual numbers"));
  p->manual_button = manual;
  g_signal_connect (manual, "clicked", G_CALLBACK (manual_cb), p);
  gtk_box_append (GTK_BOX (p->tmpl_box), manual);

  gtk_box_append (GTK_BOX (p->tmpl_box), heading (_("Fit to the bone")));
  p->readouts = gtk_grid_new ();
  gtk_grid_set_column_spacing (GTK_GRID (p->readouts), 8);
  gtk_widget_set_name (p->readouts, "template-readouts");
  {
    static const char *names[4 + HL_CANAL_LEVELS] = {
      N_("Inclination"), N_("Medial cup edge to the ilioischial line (− beyond it)"),
      N_("Uncovered lateral rim"), N_("Cup centre above the teardrop line"),
      N_("Canal fill, level 1"), N_("Canal fill, level 2"), N_("Canal fill, level 3"),
    };
    for (int k = 0; k < 4 + HL_CANAL_LEVELS; k++)
      {
        GtkWidget *n = wrap_label ();
        gtk_label_set_text (GTK_LABEL (n), _(names[k]));
        gtk_label_set_max_width_chars (GTK_LABEL (n), 24);
        gtk_widget_set_hexpand (n, TRUE);
        GtkWidget *v = gtk_label_new ("");
        gtk_label_set_xalign (GTK_LABEL (v), 1.0f);
        gtk_label_set_width_chars (GTK_LABEL (v), 22);
        gtk_label_set_ellipsize (GTK_LABEL (v), PANGO_ELLIPSIZE_END);
        gtk_widget_add_css_class (v, "numeric");
        gtk_grid_attach (GTK_GRID (p->readouts), n, 0, k, 1, 1);
        gtk_grid_attach (GTK_GRID (p->readouts), v, 1, k, 1, 1);
        p->readout_value[k] = v;
      }
  }
  gtk_box_append (GTK_BOX (p->tmpl_box), p->readouts);

  gtk_box_append (GTK_BOX (p->tmpl_box), heading (_("Suggestions")));
  GtkWidget *row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  p->cup_suggestion = wrap_label ();
  gtk_widget_set_hexpand (p->cup_suggestion, TRUE);
  p->cup_apply = gtk_button_new_with_label (_("Apply"));
  gtk_accessible_update_property (GTK_ACCESSIBLE (p->cup_apply), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                  _("Apply the cup suggestion"), -1);
  gtk_widget_set_valign (p->cup_apply, GTK_ALIGN_START);
  g_signal_connect (p->cup_apply, "clicked", G_CALLBACK (cup_apply_cb), p);
  gtk_box_append (GTK_BOX (row), p->cup_suggestion);
  gtk_box_append (GTK_BOX (row), p->cup_apply);
  gtk_box_append (GTK_BOX (p->tmpl_box), row);
  row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  p->stem_suggestion = wrap_label ();
  gtk_widget_set_hexpand (p->stem_suggestion, TRUE);
  p->stem_apply = gtk_button_new_with_label (_("Apply"));
  gtk_accessible_update_property (GTK_ACCESSIBLE (p->stem_apply), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                  _("Apply the stem suggestion"), -1);
  gtk_widget_set_valign (p->stem_apply, GTK_ALIGN_START);
  g_signal_connect (p->stem_apply, "clicked", G_CALLBACK (stem_apply_cb), p);
  gtk_box_append (GTK_BOX (row), p->stem_suggestion);
  gtk_box_append (GTK_BOX (row), p->stem_apply);
  gtk_box_append (GTK_BOX (p->tmpl_box), row);

  gtk_box_append (GTK_BOX (p->tmpl_box), heading (_("Neck and head combinations")));
  p->rank_note = wrap_label ();
  gtk_widget_add_css_class (p->rank_note, "dim-label");
  gtk_widget_add_css_class (p->rank_note, "caption");
  gtk_box_append (GTK_BOX (p->tmpl_box), p->rank_note);
  p->rank_grid = gtk_grid_new ();
  gtk_widget_set_name (p->rank_grid, "template-ranking");
  gtk_grid_set_column_spacing (GTK_GRID (p->rank_grid), 6);
  gtk_grid_set_row_spacing (GTK_GRID (p->rank_grid), 2);
  rank_grid_build (p);
  GtkWidget *scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_policy (GTK_SCROLLED_WINDOW (scroll), GTK_POLICY_AUTOMATIC,
                                  GTK_POLICY_NEVER);
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (scroll), p->rank_grid);
  gtk_box_append (GTK_BOX (p->tmpl_box), scroll);
  gtk_box_append (GTK_BOX (p->box), p->tmpl_box);

  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), p->box, 0);
  g_signal_connect (p->box, "map", G_CALLBACK (map_cb), p);
  fill_catalogues (p);
  sync_all (p);
  return p->box;
}

void
hl_template_panel_set_warnings (GtkWidget *panel, const char *warnings)
{
  Panel *p = panel_of (panel);
  /* The files that failed to load stay said above what the plan reports. */
  g_autofree char *text = g_strjoin ("\n", p->load_problems != NULL ? p->load_problems : "",
                                     warnings != NULL ? warnings : "", NULL);
  g_strstrip (text);
  gtk_label_set_text (GTK_LABEL (p->banner), text);
  gtk_widget_set_visible (p->banner, text[0] != '\0');
}

gboolean
hl_template_panel_get_busy (GtkWidget *panel)
{
  Panel *p = panel_of (panel);
  return p->running || p->pending;
}

guint
hl_template_panel_get_n_ranked (GtkWidget *panel)
{
  Panel *p = panel_of (panel);
  return (guint) MIN (p->table.n, RANK_ROWS_SHOWN);
}

double
hl_template_panel_get_rank_ms (GtkWidget *panel)
{
  return panel_of (panel)->rank_ms;
}

gboolean
hl_template_panel_apply_rank (GtkWidget *panel, guint rank)
{
  Panel *p = panel_of (panel);
  hl_document_break_coalescing (p->document);
  return apply_rank (p, rank);
}

void
hl_template_panel_set_changed_func (GtkWidget *panel, GFunc func, gpointer data)
{
  Panel *p = panel_of (panel);
  p->changed_func = func;
  p->changed_data = data;
}

void
hl_template_panel_foreach_control (GtkWidget *panel, HlTemplateControlFunc func, gpointer data)
{
  Panel *p = panel_of (panel);
  func ("template-place", p->place_button, data);
  func ("template-manual", p->manual_button, data);
  func ("template-cup-apply", p->cup_apply, data);
  func ("template-stem-apply", p->stem_apply, data);
  for (GtkWidget *c = gtk_widget_get_first_child (p->rank_grid); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    {
      gpointer rank = g_object_get_data (G_OBJECT (c), "rank");
      if (rank == NULL || !gtk_widget_get_visible (c))
        continue;
      g_autofree char *name = g_strdup_printf ("template-rank-%u", GPOINTER_TO_UINT (rank));
      func (name, c, data);
    }
}

/* ---- Catalogue files -------------------------------------------------------- */

static void
banner_append (Panel *p, const char *text)
{
  char *both = p->load_problems != NULL ? g_strdup_printf ("%s\n%s", p->load_problems, text)
                                        : g_strdup (text);
  g_free (p->load_problems);
  p->load_problems = both;
  hl_template_panel_set_warnings (p->box, NULL);
}

static char *
catalogue_error_text (const HlError *err)
{
  if (err->line > 0)
    return g_strdup_printf (_("line %d, %s: %s"), err->line, err->field, err->message);
  return g_strdup_printf ("%s%s%s", err->field, err->field[0] ? ": " : "", err->message);
}

static void
chooser_response_cb (GtkNativeDialog *dialog, int response, Panel *p)
{
  if (response != GTK_RESPONSE_ACCEPT)
    return;
  g_autoptr(GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (dialog));
  g_autofree char *path = file != NULL ? g_file_get_path (file) : NULL;
  if (path == NULL)
    return;
  HlCatalogue *cat = NULL;
  HlError err;
  hl_error_clear (&err);
  if (hl_catalogue_load_file (path, &cat, &err) != HL_OK)
    {
      g_autofree char *where = catalogue_error_text (&err);
      g_autofree char *primary = g_strdup_printf (_("The implant catalogue %s was not added"), path);
      g_signal_emit_by_name (p->document, "error", primary, where);
      return;
    }
  hl_catalogue_registry_add (cat);
  hl_settings_add_catalogue_path (path);
  fill_catalogues (p);
  p->built_key[0] = '\0';
  sync_all (p);
}

static void
add_catalogue_cb (GSimpleAction *action, GVariant *param, gpointer data)
{
  Panel *p = data;
  if (p->chooser == NULL)
    {
      p->chooser = gtk_file_chooser_native_new (_("Add Implant Catalogue"), p->window,
                                                GTK_FILE_CHOOSER_ACTION_OPEN, _("_Add"),
                                                _("_Cancel"));
      GtkFileFilter *f = gtk_file_filter_new ();
      gtk_file_filter_set_name (f, _("Implant catalogues (*.hlcat)"));
      gtk_file_filter_add_pattern (f, "*" HL_CATALOGUE_FILE_EXTENSION);
      gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (p->chooser), f);
      g_object_unref (f);
      g_signal_connect (p->chooser, "response", G_CALLBACK (chooser_response_cb), p);
    }
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (p->chooser));
}

void
hl_template_panel_setup_catalogues (GtkWidget *panel, GtkWindow *window, GActionMap *actions)
{
  Panel *p = panel_of (panel);
  static gboolean loaded;
  p->window = window;
  if (!loaded)
    {
      loaded = TRUE;
      g_auto(GStrv) paths = hl_settings_get_catalogue_paths ();
      for (char **q = paths; *q != NULL; q++)
        {
          HlCatalogue *cat = NULL;
          HlError err;
          hl_error_clear (&err);
          if (hl_catalogue_load_file (*q, &cat, &err) == HL_OK)
            hl_catalogue_registry_add (cat);
          else
            {
              g_autofree char *where = catalogue_error_text (&err);
              g_autofree char *text = g_strdup_printf (_("The implant catalogue %s could not be loaded (%s)."),
                                                       *q, where);
              banner_append (p, text);
            }
        }
      fill_catalogues (p);
    }
  static const GActionEntry entries[] = { { "add-catalogue", add_catalogue_cb, NULL, NULL, NULL } };
  g_action_map_add_action_entries (actions, entries, G_N_ELEMENTS (entries), p);
}
