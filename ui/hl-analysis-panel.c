/* hl-analysis-panel.c: the "Analysis" page of the side panel, the ranges
 * of the results table and the charts' recompute.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-analysis-panel"

#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <glib/gi18n.h>

#include "hl-analysis-panel.h"
#include "hl-answer.h"
#include "hl-capacity.h"
#include "hl-charts-view.h"
#include "hl-report.h"
#include "hl-uncertainty.h"
#include "hl-version.h"
#include "hl-message.h"
#include "hl-ui-util.h"

#define PAGE_SPACING 6
#define LINE_SPACING 2
#define ANSWER_MAX 512
/* A capacity torque this close to a preset is that preset (N m/kg): the
 * presets are shown to two decimals, plan files keep more. */
#define CAPACITY_MATCH_TOL 5e-4
#define TARGET_STEP_BW 0.05
#define TARGET_PAGE_BW 0.5
#define TARGET_DIGITS 2
#define PERCENT 100.0

typedef struct {
  GtkWidget *box;
  GtkWidget *text;
  GtkWidget *action;
  GtkWidget *apply;
} HlAnswerRow;

struct _HlAnalysisPanel {
  GtkBox parent_instance;

  /* borrowed */
  HlDocument *document;

  /* template widgets */
  GtkWidget *scroll;
  GtkWidget *caveat_label;
  GtkWidget *for_label;
  GtkWidget *target_spin;
  GtkWidget *target_note_label;
  GtkWidget *error_label;
  GtkWidget *answers_box;
  GtkWidget *capacity_drop;
  GtkWidget *capacity_source;
  GtkWidget *capacity_assumption_label;
  GtkWidget *capacity_force_label;
  GtkWidget *capacity_grid;
  GtkWidget *caution_label;

  /* built in code */
  HlAnswerRow rows[HL_QUESTION_N];
  size_t capacity_rows;

  /* state */
  HlInverseAnswer answers[HL_QUESTION_N];
  gboolean asked[HL_QUESTION_N];
  guint syncing;
  gboolean stale;      /* edited while hidden: answers follow when shown */
};

G_DEFINE_FINAL_TYPE (HlAnalysisPanel, hl_analysis_panel, GTK_TYPE_BOX)

enum {
  SIGNAL_SHOWN_CHANGED,
  N_SIGNALS
};

static guint signals[N_SIGNALS];

static const HlRecon *
selected_recon (HlDocument *document)
{
  const HlPlan *plan = hl_document_get_plan (document);
  int index = hl_document_get_selected_option (document);

  if (index < 0 || (size_t) index >= plan->n_options)
    return NULL;
  return &plan->options[index].recon;
}

static char *
format_error (const HlError *err)
{
  return hl_document_format_error (err);
}

/* ---- the inverse answers -------------------------------------------- */

static const char *
site_words (HlLoadSite site)
{
  switch (site)
    {
    case HL_LOAD_SITE_CONTRALATERAL:
      return _("in the opposite hand");
    case HL_LOAD_SITE_IPSILATERAL:
      return _("in the same-side hand");
    case HL_LOAD_SITE_MIDLINE:
    case HL_LOAD_SITE_N:
    default:
      break;
    }
  return _("on the midline");
}

/* What Apply would change, or NULL (and why in *why) when nothing. */
static char *
apply_words (HlAnalysisPanel *self, HlQuestion q, const char **why)
{
  const HlPlan *plan = hl_document_get_plan (self->document);
  const HlInverseAnswer *a = &self->answers[q];
  double v = a->value;

  *why = NULL;
  if (!self->asked[q])
    return NULL;
  switch (hl_answer_apply_state (plan, hl_document_get_selected_option (self->document), q, a))
    {
    case HL_APPLY_CHANGES:
      break;
    case HL_APPLY_ALREADY:
      *why = _("Already in the plan.");
      return NULL;
    case HL_APPLY_WHOLE_RANGE:
      *why = _("Nothing to apply: the target holds over the whole range.");
      return NULL;
    case HL_APPLY_NO_ANSWER:
    default:
      *why = _("Nothing to apply.");
      return NULL;
    }
  switch (hl_question_kind (q))
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      return g_strdup_printf (_("Apply sets the femoral offset change of “%s” to %+.1f mm."),
                              plan->options[hl_document_get_selected_option (self->document)].name, v);
    case HL_INVERSE_CANE_FOR_JRF:
      {
        double in_unit = hl_force_from_newtons (v, plan->cane.unit, plan->mass_kg);

        if (v <= HL_ANSWER_SAME_TOL)
          return g_strdup (_("Apply takes the cane away, for every option."));
        switch (plan->cane.unit)
          {
          case HL_FORCE_UNIT_PERCENT_BW:
            return g_strdup_printf (_("Apply sets the cane to %.1f%% of body weight in the opposite hand, for every option."),
                                    in_unit);
          case HL_FORCE_UNIT_KG:
            return g_strdup_printf (_("Apply sets the cane to %.1f kg on a scale in the opposite hand, for every option."),
                                    in_unit);
          case HL_FORCE_UNIT_N:
          default:
            return g_strdup_printf (_("Apply sets the cane to %.0f N in the opposite hand, for every option."),
                                    in_unit);
          }
      }
    case HL_INVERSE_LOAD_FOR_JRF:
      return g_strdup_printf (_("Apply sets the load %s to %.1f kg, for every option."),
                              site_words (hl_question_site (q)), v);
    case HL_INVERSE_LEAN_FOR_CAPACITY:
    case HL_INVERSE_N:
    default:
      break;
    }
  return g_strdup_printf (_("Apply sets the lateral trunk lean to %.1f mm, for every option."), v);
}

static void
show_answers (HlAnalysisPanel *self)
{
  for (int q = 0; q < HL_QUESTION_N; q++)
    {
      HlAnswerRow *row = &self->rows[q];
      g_autofree char *words = NULL;
      const char *why = NULL;
      char text[ANSWER_MAX];

      gtk_widget_set_visible (row->box, self->asked[q]);
      if (!self->asked[q])
        {
          gtk_widget_set_sensitive (row->apply, FALSE);
          continue;
        }
      hl_inverse_answer_format (&self->answers[q], text, sizeof text);
      gtk_label_set_text (GTK_LABEL (row->text), text);
      words = apply_words (self, (HlQuestion) q, &why);
      gtk_label_set_text (GTK_LABEL (row->action), words != NULL ? words : why);
      gtk_widget_set_sensitive (row->apply, words != NULL);
      {
        g_autofree char *label = g_strdup_printf ("%s %s", _("Apply:"),
                                                  words != NULL ? words : why);

        gtk_accessible_update_property (GTK_ACCESSIBLE (row->apply),
                                        GTK_ACCESSIBLE_PROPERTY_LABEL, label, -1);
      }
    }
}

static void
compute_answers (HlAnalysisPanel *self)
{
  const HlPlan *plan = hl_document_get_plan (self->document);
  const HlRecon *recon = selected_recon (self->document);
  double target = gtk_spin_button_get_value (GTK_SPIN_BUTTON (self->target_spin));
  g_autofree char *who = NULL;
  const HlModel *model;
  HlError err;

  if (recon != NULL)
    who = g_strdup_printf (_("For the selected option, “%s”. Select another in the Options page or on the schematic."),
                           plan->options[hl_document_get_selected_option (self->document)].name);
  else
    who = g_strdup (_("For the native hip (no option selected). Select an option for its femoral offset answers."));
  gtk_label_set_text (GTK_LABEL (self->for_label), who);

  hl_error_clear (&err);
  memset (self->asked, 0, sizeof self->asked);
  model = hl_document_get_model (self->document, &err);
  if (model != NULL)
    {
      for (int q = 0; q < HL_QUESTION_N && err.status == HL_OK; q++)
        {
          HlInverseAnswer *a = &self->answers[q];
          HlStatus st;

          if (hl_question_needs_option ((HlQuestion) q) && recon == NULL)
            continue;
          st = hl_question_ask ((HlQuestion) q, model, plan, recon, target, a, &err);
          /* Not reachable and not converged are answers; anything else
           * is a failure of the model. */
          if (st == HL_OK || st == HL_ERR_NOT_REACHABLE || st == HL_ERR_NOT_CONVERGED)
            {
              hl_error_clear (&err);
              self->asked[q] = TRUE;
            }
        }
    }
  if (err.status != HL_OK)
    {
      g_autofree char *msg = format_error (&err);
      g_autofree char *text = g_strdup_printf (_("No answers: %s"), msg);

      memset (self->asked, 0, sizeof self->asked);
      gtk_label_set_text (GTK_LABEL (self->error_label), text);
    }
  gtk_widget_set_visible (self->error_label, err.status != HL_OK);
  show_answers (self);
}

/* ---- applying ------------------------------------------------------- */

static void show_capacity (HlAnalysisPanel *self);

gboolean
hl_analysis_panel_apply (HlAnalysisPanel *self, HlQuestion q)
{
  g_autofree char *words = NULL;
  const char *why;
  HlPlan *plan;

  g_return_val_if_fail (HL_IS_ANALYSIS_PANEL (self) && q < HL_QUESTION_N, FALSE);
  /* A hidden page's answers may be of an earlier plan. */
  if (self->stale)
    {
      self->stale = FALSE;
      compute_answers (self);
      show_capacity (self);
    }
  words = apply_words (self, q, &why);
  if (words == NULL)
    return FALSE;
  hl_document_break_coalescing (self->document);
  if ((plan = hl_document_begin_edit (self->document, NULL)) == NULL)
    return FALSE;
  hl_answer_apply (plan, hl_document_get_selected_option (self->document), q, &self->answers[q]);
  hl_document_break_coalescing (self->document);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_VALUES);
  {
    g_autofree char *status = g_strdup_printf (_("Applied: %s Undo with Ctrl+Z."), words);

    hl_message_show_status (GTK_WIDGET (self), status);
  }
  return TRUE;
}

static void
apply_clicked_cb (GtkButton *button, HlAnalysisPanel *self)
{
  for (int q = 0; q < HL_QUESTION_N; q++)
    if (self->rows[q].apply == GTK_WIDGET (button))
      hl_analysis_panel_apply (self, (HlQuestion) q);
}

static void
target_changed_cb (GtkSpinButton *spin, HlAnalysisPanel *self)
{
  if (self->syncing == 0)
    {
      compute_answers (self);
      g_signal_emit (self, signals[SIGNAL_SHOWN_CHANGED], 0);
    }
}

/* ---- capacity ------------------------------------------------------- */

static guint
capacity_preset_of (const HlPlan *plan)
{
  for (int p = 0; p < HL_CAPACITY_PRESET_N; p++)
    if (fabs (hl_capacity_preset_info ((HlCapacityPreset) p)->torque_nm_per_kg
              - plan->capacity.torque_nm_per_kg) <= CAPACITY_MATCH_TOL)
      return (guint) p;
  return HL_CAPACITY_PRESET_N;
}

static GtkWidget *
grid_label (const char *text, gboolean heading, float xalign)
{
  GtkWidget *label = gtk_label_new (text);

  gtk_label_set_xalign (GTK_LABEL (label), xalign);
  gtk_label_set_wrap (GTK_LABEL (label), TRUE);
  if (heading)
    gtk_widget_add_css_class (label, "heading");
  return label;
}

static void
show_capacity (HlAnalysisPanel *self)
{
  const HlPlan *plan = hl_document_get_plan (self->document);
  size_t n = 1 + plan->n_options;
  guint preset = capacity_preset_of (plan);
  GtkGrid *grid = GTK_GRID (self->capacity_grid);
  GtkWidget *child;
  const HlSolved *solved = hl_document_get_solved (self->document, NULL);
  const HlModel *model;

  self->syncing++;
  gtk_drop_down_set_selected (GTK_DROP_DOWN (self->capacity_drop), preset);
  self->syncing--;
  if (preset < HL_CAPACITY_PRESET_N)
    gtk_label_set_text (GTK_LABEL (self->capacity_source),
                        hl_capacity_preset_info ((HlCapacityPreset) preset)->source);
  else
    {
      g_autofree char *text = g_strdup_printf (_("%.2f N m/kg, a value of the plan (change it on the Case page)."),
                                               plan->capacity.torque_nm_per_kg);

      gtk_label_set_text (GTK_LABEL (self->capacity_source), text);
    }

  model = hl_document_get_model (self->document, NULL);
  if (model != NULL)
    {
      g_autofree char *text = g_strdup_printf (_("%.2f N m/kg × %.1f kg over the native abductor moment arm of %.1f mm: a capacity of %.0f N (%.2f × body weight)."),
                                               plan->capacity.torque_nm_per_kg, plan->mass_kg,
                                               model->native_abductor_arm_mm, model->capacity_force_n,
                                               model->capacity_force_n * model->inv_body_weight);

      gtk_label_set_text (GTK_LABEL (self->capacity_force_label), text);
    }
  else
    gtk_label_set_text (GTK_LABEL (self->capacity_force_label), "");

  while ((child = gtk_widget_get_first_child (self->capacity_grid)) != NULL)
    gtk_grid_remove (grid, child);
  gtk_grid_attach (grid, grid_label (_("Demand over capacity"), TRUE, 0.0f), 0, 0, 3, 1);
  for (size_t c = 0; c < n; c++)
    {
      const HlSolved *s = &solved[c];
      const char *name = c == 0 ? _("Native") : plan->options[c - 1].name;
      g_autofree char *value = NULL;
      const char *words;
      GtkWidget *v;

      if (s->status != HL_OK)
        {
          value = g_strdup ("—");
          words = _("cannot be solved");
        }
      else if (!isfinite (s->result.demand))
        {
          value = g_strdup ("—");
          words = _("no capacity set");
        }
      else
        {
          value = g_strdup_printf ("%.0f%%", PERCENT * s->result.demand);
          if (s->result.demand > HL_DEMAND_LIMIT)
            words = _("above capacity: the pelvis cannot be held level (a positive Trendelenburg sign or a compensating lean)");
          else if (s->result.abductor_force_n <= 0.0)
            words = _("abductors not needed in this posture");
          else
            words = _("within capacity");
        }
      v = grid_label (value, FALSE, 1.0f);
      if (s->status == HL_OK && isfinite (s->result.demand) && s->result.demand > HL_DEMAND_LIMIT)
        gtk_widget_add_css_class (v, "error");
      gtk_grid_attach (grid, grid_label (name, FALSE, 0.0f), 0, (int) c + 1, 1, 1);
      gtk_grid_attach (grid, v, 1, (int) c + 1, 1, 1);
      gtk_grid_attach (grid, grid_label (words, FALSE, 0.0f), 2, (int) c + 1, 1, 1);
    }
  self->capacity_rows = n;
}

static void
capacity_preset_cb (GtkDropDown *drop, GParamSpec *pspec, HlAnalysisPanel *self)
{
  guint preset = gtk_drop_down_get_selected (drop);
  double torque;
  HlPlan *plan;

  if (self->syncing > 0 || preset >= HL_CAPACITY_PRESET_N)
    return;
  torque = hl_capacity_preset_info ((HlCapacityPreset) preset)->torque_nm_per_kg;
  if (torque == hl_document_get_plan (self->document)->capacity.torque_nm_per_kg)
    return;
  hl_document_break_coalescing (self->document);
  if ((plan = hl_document_begin_edit (self->document, NULL)) == NULL)
    return;
  plan->capacity.torque_nm_per_kg = torque;
  hl_document_break_coalescing (self->document);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_VALUES);
}

/* ---- following the document ---------------------------------------- */

static void
document_changed_cb (HlDocument *document, guint what, HlAnalysisPanel *self)
{
  if (!(what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_RESULTS
                | HL_DOCUMENT_CHANGED_SELECTION)))
    return;
  /* The answers and capacity wait until the page is shown: relaying out
   * their labels on every frame of a drag cost more than the drawing. */
  self->stale = !gtk_widget_get_mapped (GTK_WIDGET (self));
  if (self->stale)
    return;
  compute_answers (self);
  if (what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_RESULTS))
    show_capacity (self);
}

static void
panel_map_cb (GtkWidget *widget, gpointer user_data)
{
  HlAnalysisPanel *self = HL_ANALYSIS_PANEL (widget);

  if (!self->stale)
    return;
  self->stale = FALSE;
  compute_answers (self);
  show_capacity (self);
}

double
hl_analysis_panel_get_target_bw (HlAnalysisPanel *self)
{
  if (self == NULL)
    return HL_REPORT_TARGET_JRF_BW_DEFAULT;
  g_return_val_if_fail (HL_IS_ANALYSIS_PANEL (self), HL_REPORT_TARGET_JRF_BW_DEFAULT);
  return gtk_spin_button_get_value (GTK_SPIN_BUTTON (self->target_spin));
}

static void
scrolled_cb (GtkAdjustment *adjustment, HlAnalysisPanel *self)
{
  g_signal_emit (self, signals[SIGNAL_SHOWN_CHANGED], 0);
}

static GtkWidget *
caption (const char *text)
{
  GtkWidget *label = gtk_label_new (text);

  gtk_label_set_xalign (GTK_LABEL (label), 0.0f);
  gtk_label_set_wrap (GTK_LABEL (label), TRUE);
  gtk_widget_add_css_class (label, "dim-label");
  gtk_widget_add_css_class (label, "caption");
  return label;
}

/* What the template cannot hold: texts of the core, the answers' rows,
 * the presets. */
static void
build (HlAnalysisPanel *self)
{
  g_autoptr(GtkStringList) presets = gtk_string_list_new (NULL);
  g_autofree char *target_note = NULL;

  gtk_label_set_text (GTK_LABEL (self->caveat_label), hl_inverse_caveat ());
  hl_ui_spin_set_range (GTK_SPIN_BUTTON (self->target_spin), HL_REPORT_TARGET_JRF_BW_MIN,
                        HL_REPORT_TARGET_JRF_BW_MAX, TARGET_STEP_BW);
  gtk_spin_button_set_digits (GTK_SPIN_BUTTON (self->target_spin), TARGET_DIGITS);
  gtk_spin_button_set_increments (GTK_SPIN_BUTTON (self->target_spin), TARGET_STEP_BW,
                                  TARGET_PAGE_BW);
  gtk_spin_button_set_value (GTK_SPIN_BUTTON (self->target_spin),
                             HL_REPORT_TARGET_JRF_BW_DEFAULT);
  g_signal_connect (self->target_spin, "value-changed", G_CALLBACK (target_changed_cb), self);
  target_note = g_strdup_printf (_("For the cane and load answers. Default %.2f × body weight: a round figure of ours below the 2.1–2.8 × BW measured in static single-leg stance (Kotzar et al. 1991, J Orthop Res 9:621-633)."),
                                 HL_REPORT_TARGET_JRF_BW_DEFAULT);
  gtk_label_set_text (GTK_LABEL (self->target_note_label), target_note);

  for (int q = 0; q < HL_QUESTION_N; q++)
    {
      HlAnswerRow *row = &self->rows[q];
      GtkWidget *words = gtk_box_new (GTK_ORIENTATION_VERTICAL, LINE_SPACING);

      row->box = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, PAGE_SPACING);
      gtk_widget_add_css_class (row->box, "analysis-answer");
      row->text = gtk_label_new (NULL);
      gtk_label_set_xalign (GTK_LABEL (row->text), 0.0f);
      gtk_label_set_wrap (GTK_LABEL (row->text), TRUE);
      gtk_label_set_selectable (GTK_LABEL (row->text), FALSE);
      row->action = caption ("");
      gtk_box_append (GTK_BOX (words), row->text);
      gtk_box_append (GTK_BOX (words), row->action);
      gtk_widget_set_hexpand (words, TRUE);
      row->apply = gtk_button_new_with_label (_("Apply"));
      gtk_widget_set_valign (row->apply, GTK_ALIGN_CENTER);
      g_signal_connect (row->apply, "clicked", G_CALLBACK (apply_clicked_cb), self);
      gtk_box_append (GTK_BOX (row->box), words);
      gtk_box_append (GTK_BOX (row->box), row->apply);
      gtk_box_append (GTK_BOX (self->answers_box), row->box);
    }

  for (int p = 0; p < HL_CAPACITY_PRESET_N; p++)
    gtk_string_list_append (presets, _(hl_capacity_preset_info ((HlCapacityPreset) p)->label));
  gtk_string_list_append (presets, _("Another value (type it on the Case page)"));
  gtk_drop_down_set_model (GTK_DROP_DOWN (self->capacity_drop), G_LIST_MODEL (presets));
  g_signal_connect (self->capacity_drop, "notify::selected", G_CALLBACK (capacity_preset_cb), self);
  gtk_label_set_text (GTK_LABEL (self->capacity_assumption_label),
                      hl_capacity_assumption_text ());
  gtk_label_set_text (GTK_LABEL (self->caution_label), hl_caution_short ());
}

GtkWidget *
hl_analysis_panel_new (HlDocument *document)
{
  HlAnalysisPanel *self;

  g_return_val_if_fail (HL_IS_DOCUMENT (document), NULL);
  self = g_object_new (HL_TYPE_ANALYSIS_PANEL, NULL);
  self->document = document;
  build (self);
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  g_signal_connect (self, "map", G_CALLBACK (panel_map_cb), NULL);
  g_signal_connect_object (gtk_scrolled_window_get_vadjustment (GTK_SCROLLED_WINDOW (self->scroll)),
                           "value-changed", G_CALLBACK (scrolled_cb), self, 0);
  self->stale = TRUE;
  return GTK_WIDGET (self);
}

/* ---- test hooks ----------------------------------------------------- */

void
hl_analysis_panel_print_handles (HlAnalysisPanel *self)
{
  g_return_if_fail (HL_IS_ANALYSIS_PANEL (self));
  hl_ui_print_widget ("analysis-target", self->target_spin);
  hl_ui_print_widget ("capacity-preset", self->capacity_drop);
  for (int q = 0; q < HL_QUESTION_N; q++)
    {
      const HlInverseAnswer *a = &self->answers[q];
      g_autofree char *name = g_strdup_printf ("apply-%s", hl_question_key ((HlQuestion) q));
      const char *status = !self->asked[q] ? "none"
                           : a->status == HL_OK ? "ok"
                           : a->status == HL_ERR_NOT_REACHABLE ? "not-reachable" : "not-converged";

      hl_ui_print_widget (name, self->rows[q].apply);
      printf ("ANSWER %s %s %.9g %d\n", hl_question_key ((HlQuestion) q), status,
              self->asked[q] && a->status == HL_OK ? a->value : NAN,
              gtk_widget_get_sensitive (self->rows[q].apply));
    }
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_analysis_panel_dispose (GObject *object)
{
  gtk_widget_dispose_template (GTK_WIDGET (object), HL_TYPE_ANALYSIS_PANEL);
  G_OBJECT_CLASS (hl_analysis_panel_parent_class)->dispose (object);
}

static void
hl_analysis_panel_class_init (HlAnalysisPanelClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = hl_analysis_panel_dispose;
  signals[SIGNAL_SHOWN_CHANGED] = g_signal_new ("shown-changed", G_TYPE_FROM_CLASS (klass),
                                                G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                                G_TYPE_NONE, 0);
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-analysis-panel.ui");
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, scroll);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, caveat_label);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, for_label);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, target_spin);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, target_note_label);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, error_label);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, answers_box);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, capacity_drop);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, capacity_source);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, capacity_assumption_label);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, capacity_force_label);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, capacity_grid);
  gtk_widget_class_bind_template_child (widget_class, HlAnalysisPanel, caution_label);
}

static void
hl_analysis_panel_init (HlAnalysisPanel *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
}
