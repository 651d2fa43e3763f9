/* test-plan-io.c: plan files, planning summaries, the schema, safe loading
 * and atomic saving.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * These tests check the file module against itself (round trips), against
 * xmllint (every written file must validate against data/hiplever-plan.xsd)
 * and against hostile input; no external reference values are involved.
 */
#include "config.h"

#include <check.h>
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <locale.h>
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "hl-image.h"
#include "hl-plan-io.h"
#include <glib.h>
#include "hl-path.h"
#include "hl-result-fields.h"
#include "hl-solve.h"
#include "hl-test-util.h"
#include "hl-version.h"

#ifndef HL_TEST_SRCDIR
# error "HL_TEST_SRCDIR must name the source tree"
#endif

#define HL_SCHEMA_PATH HL_TEST_SRCDIR "/data/hiplever-plan.xsd"
#define HL_EXAMPLES_DIR HL_TEST_SRCDIR "/data/examples"
#define HL_FIXTURES_DIR HL_TEST_SRCDIR "/tests/files"

#define HL_ROUND_TRIP_PLANS 200
#define HL_ROUND_TRIP_SEED 0x5eed2385u
#define HL_GARBAGE_SEED 0x6a7bu
#define HL_GARBAGE_BYTES 4096
#define HL_XMLLINT_BATCH 40
#define HL_TRUNCATION_STEP 7      /* prefixes tried when cutting a file short */
#define HL_SUMMARY_DATE "2026-03-01T09:30:00Z"
#define HL_PATH_MAX 4096

/* ---- Helpers ---------------------------------------------------------- */

typedef struct {
  uint64_t s;
} HlRand;

/* splitmix64: small, fast and fully determined by the seed. */
static uint64_t
rand_next (HlRand *r)
{
  uint64_t z = (r->s += 0x9e3779b97f4a7c15ull);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
  return z ^ (z >> 31);
}

static double
rand_uniform (HlRand *r, double lo, double hi)
{
  return lo + (hi - lo) * (double) (rand_next (r) >> 11) * 0x1.0p-53;
}

static int
rand_int (HlRand *r, int n)
{
  return (int) (rand_next (r) % (uint64_t) n);
}

static bool
rand_chance (HlRand *r, double p)
{
  return rand_uniform (r, 0.0, 1.0) < p;
}

static char *
read_whole_file (const char *path, size_t *size)
{
  FILE *f = fopen (path, "rb");
  ck_assert_msg (f != NULL, "cannot open %s: %s", path, strerror (errno));
  fseek (f, 0, SEEK_END);
  long n = ftell (f);
  fseek (f, 0, SEEK_SET);
  char *data = malloc ((size_t) n + 1);
  ck_assert_ptr_nonnull (data);
  ck_assert_uint_eq (fread (data, 1, (size_t) n, f), (size_t) n);
  data[n] = '\0';
  fclose (f);
  if (size != NULL)
    *size = (size_t) n;
  return data;
}

static void
write_whole_file (const char *path, const void *data, size_t size)
{
  FILE *f = fopen (path, "wb");
  ck_assert_msg (f != NULL, "cannot create %s: %s", path, strerror (errno));
  ck_assert_uint_eq (fwrite (data, 1, size, f), size);
  ck_assert_int_eq (fclose (f), 0);
}

static char *
make_temp_dir (void)
{
  char *dir = strdup ("/tmp/hl-test-plan-io-XXXXXX");
  ck_assert_ptr_nonnull (dir);
  ck_assert_msg (mkdtemp (dir) != NULL, "mkdtemp: %s", strerror (errno));
  return dir;
}

static void
remove_tree (char *dir)
{
  char cmd[HL_PATH_MAX + 32];
  snprintf (cmd, sizeof cmd, "rm -rf '%s'", dir);
  ck_assert_int_eq (system (cmd), 0);
  free (dir);
}

/* Entries of `dir` whose names start with `prefix`. */
static int
count_entries (const char *dir, const char *prefix)
{
  DIR *d = opendir (dir);
  ck_assert_msg (d != NULL, "opendir %s: %s", dir, strerror (errno));
  int n = 0;
  struct dirent *e;
  while ((e = readdir (d)) != NULL)
    if (strncmp (e->d_name, prefix, strlen (prefix)) == 0)
      n++;
  closedir (d);
  return n;
}

/* Runs xmllint on the files; fails the test with its output if one does
 * not validate, or if xmllint is missing. */
static void
xmllint_validate (char **paths, int n)
{
  ck_assert_msg (system ("command -v xmllint >/dev/null 2>&1") == 0,
                 "xmllint is not installed (Debian package libxml2-utils)");
  for (int at = 0; at < n; at += HL_XMLLINT_BATCH)
    {
      size_t size = 256 + sizeof HL_SCHEMA_PATH;
      for (int i = at; i < n && i < at + HL_XMLLINT_BATCH; i++)
        size += strlen (paths[i]) + 4;
      char *cmd = malloc (size);
      ck_assert_ptr_nonnull (cmd);
      int len = snprintf (cmd, size, "xmllint --noout --schema '%s'", HL_SCHEMA_PATH);
      for (int i = at; i < n && i < at + HL_XMLLINT_BATCH; i++)
        len += snprintf (cmd + len, size - (size_t) len, " '%s'", paths[i]);
      snprintf (cmd + len, size - (size_t) len, " >/tmp/hl-xmllint.$$ 2>&1 || "
                "{ cat /tmp/hl-xmllint.$$ >&2; rm -f /tmp/hl-xmllint.$$; exit 1; }; "
                "rm -f /tmp/hl-xmllint.$$");
      int rc = system (cmd);
      ck_assert_msg (rc == 0, "xmllint refused a written file (see the output above): %s", cmd);
      free (cmd);
    }
}

static void
xmllint_validate_one (const char *path)
{
  char *p = (char *) path;
  xmllint_validate (&p, 1);
}

/* Sends stderr to a file for the duration, so a test can check that
 * libxml2 printed nothing. */
typedef struct {
  int saved;
  char path[64];
} HlStderrCapture;

static void
capture_stderr_begin (HlStderrCapture *c)
{
  snprintf (c->path, sizeof c->path, "/tmp/hl-test-stderr-XXXXXX");
  int fd = mkstemp (c->path);
  ck_assert_int_ge (fd, 0);
  fflush (stderr);
  c->saved = dup (STDERR_FILENO);
  dup2 (fd, STDERR_FILENO);
  close (fd);
}

static char *
capture_stderr_end (HlStderrCapture *c)
{
  fflush (stderr);
  dup2 (c->saved, STDERR_FILENO);
  close (c->saved);
  char *text = read_whole_file (c->path, NULL);
  unlink (c->path);
  return text;
}

static bool
same_double (double a, double b)
{
  return memcmp (&a, &b, sizeof a) == 0;
}

/* Compares every field of two plans bit for bit; says which differs. */
static bool
plans_equal (const HlPlan *a, const HlPlan *b, char *why, size_t size)
{
#define SAME_D(f) do { if (!same_double (a->f, b->f)) { \
      snprintf (why, size, "%s: %.17g against %.17g", #f, a->f, b->f); return false; } } while (0)
#define SAME_I(f) do { if ((long) a->f != (long) b->f) { \
      snprintf (why, size, "%s: %ld against %ld", #f, (long) a->f, (long) b->f); return false; } } while (0)
#define SAME_S(f) do { if (strcmp (a->f, b->f) != 0) { \
      snprintf (why, size, "%s: \"%.80s\" against \"%.80s\"", #f, a->f, b->f); return false; } } while (0)

  SAME_S (label);
  SAME_D (mass_kg);
  SAME_I (side);
  SAME_I (model.limb_table);
  SAME_D (model.limb_fraction_custom);
  SAME_I (model.bw_line);
  SAME_I (model.abductor_line);
  SAME_D (model.abductor_angle_deg);
  SAME_D (model.lean_mm);
  SAME_I (landmarks.placed);
  for (int i = 0; i < HL_LM_COUNT; i++)
    if (hl_landmarks_has (&a->landmarks, (HlLandmarkId) i))
      {
        SAME_D (landmarks.p[i].x);
        SAME_D (landmarks.p[i].y);
      }
  SAME_I (calibration.method);
  SAME_D (calibration.magnification);
  SAME_D (calibration.marker_diameter_mm);
  SAME_D (calibration.known_distance_mm);
  SAME_I (calibration.n_points);
  for (int i = 0; i < a->calibration.n_points; i++)
    {
      SAME_D (calibration.points[i].x);
      SAME_D (calibration.points[i].y);
    }
  SAME_I (cane.enabled);
  SAME_I (cane.hand);
  SAME_I (cane.unit);
  SAME_D (cane.value);
  SAME_D (cane.distance_mm);
  for (int h = 0; h < 2; h++)
    {
      SAME_D (loads.hand[h].mass_kg);
      SAME_D (loads.hand[h].distance_mm);
    }
  SAME_D (loads.midline_kg);
  SAME_D (tol.global_offset_drop_mm);
  SAME_D (tol.leg_length_mm);
  SAME_D (tol.abductor_slack_mm);
  SAME_D (capacity.torque_nm_per_kg);
  SAME_I (uncertainty.n_samples);
  if (a->uncertainty.seed != b->uncertainty.seed)
    {
      snprintf (why, size, "uncertainty.seed differs");
      return false;
    }
  SAME_D (uncertainty.landmark_sd_mm);
  SAME_D (uncertainty.magnification_sd);
  SAME_D (uncertainty.line_angle_sd_deg);
  SAME_S (notes);
  SAME_I (radiograph.present);
  if (a->radiograph.present)
    {
      SAME_S (radiograph.path);
      SAME_S (radiograph.sha256);
      SAME_D (radiograph.pixel_spacing_mm);
      SAME_D (radiograph.origin_mm.x);
      SAME_D (radiograph.origin_mm.y);
      SAME_D (radiograph.brightness);
      SAME_D (radiograph.contrast);
      SAME_D (radiograph.window_centre);
      SAME_D (radiograph.window_width);
      SAME_I (radiograph.spacing_source);
      SAME_I (radiograph.invert);
      SAME_D (radiograph.opacity);
      SAME_I (radiograph.schematic_visible);
    }
  SAME_I (n_options);
  for (size_t i = 0; i < a->n_options; i++)
    {
      SAME_S (options[i].name);
      SAME_D (options[i].recon.cup_medial_mm);
      SAME_D (options[i].recon.cup_superior_mm);
      SAME_D (options[i].recon.femoral_offset_mm);
      SAME_D (options[i].recon.femoral_length_mm);
      SAME_D (options[i].recon.head_length_mm);
      SAME_D (options[i].recon.neck_shaft_angle_deg);
    }
  return true;
#undef SAME_D
#undef SAME_I
#undef SAME_S
}

static bool
results_equal (const HlResult *a, const HlResult *b, char *why, size_t size)
{
#define SAME_R(f) do { if (!same_double (a->f, b->f)) { \
      snprintf (why, size, "%s: %.17g against %.17g", #f, a->f, b->f); return false; } } while (0)
  SAME_R (abductor_arm_mm);
  SAME_R (bw_arm_mm);
  SAME_R (lever_ratio);
  SAME_R (abductor_force_n);
  SAME_R (abductor_force_bw);
  SAME_R (jrf_x_n);
  SAME_R (jrf_y_n);
  SAME_R (jrf_n);
  SAME_R (jrf_bw);
  SAME_R (moment_ext_nmm);
  SAME_R (unbalanced_nmm);
  SAME_R (x_s_mm);
  SAME_R (demand);
  SAME_R (leg_length_change_mm);
  SAME_R (femoral_offset_change_mm);
  SAME_R (acetabular_offset_change_mm);
  SAME_R (global_offset_change_mm);
  SAME_R (abductor_length_change_mm);
  if (a->flags != b->flags)
    {
      snprintf (why, size, "flags: %u against %u", a->flags, b->flags);
      return false;
    }
  return true;
#undef SAME_R
}

static void
assert_same_results (const HlPlan *a, const HlPlan *b, int index)
{
  HlResult *ra = calloc (1 + a->n_options, sizeof *ra);
  HlResult *rb = calloc (1 + b->n_options, sizeof *rb);
  ck_assert_ptr_nonnull (ra);
  ck_assert_ptr_nonnull (rb);
  HlError err;
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_solve_all (a, ra, &err) == HL_OK, "plan %d does not solve: %s",
                 index, err.message);
  ck_assert_msg (hl_plan_solve_all (b, rb, &err) == HL_OK,
                 "plan %d does not solve after the round trip: %s", index, err.message);
  char why[256];
  for (size_t i = 0; i <= a->n_options; i++)
    ck_assert_msg (results_equal (&ra[i], &rb[i], why, sizeof why),
                   "plan %d, result %zu differs after the round trip: %s", index, i, why);
  free (ra);
  free (rb);
}

/* ---- Random valid plans ------------------------------------------------ */

static const char *const text_pieces[] = {
  "a", "b", "k", "m", "x", "z", "Q", "0", "7", " ", ",", ".", "-", "&", "<", ">",
  "\"", "'", "\xc3\xa9" /* e acute */, "\xc3\xbc" /* u umlaut */,
  "\xe2\x86\x92" /* arrow */, "\t", "\n", "]]>", "&amp;",
};

static void
random_text (HlRand *r, char *out, size_t size, size_t max_len, bool line_breaks)
{
  size_t len = 0;
  size_t want = (size_t) rand_int (r, (int) max_len + 1);
  out[0] = '\0';
  while (len < want)
    {
      const char *piece = text_pieces[rand_int (r, (int) (sizeof text_pieces / sizeof text_pieces[0]))];
      if (line_breaks && rand_chance (r, 0.05))
        piece = "\r\n";
      /* Names and labels are one line without control characters
       * (hl_plan_check); the notes may hold any. */
      if (!line_breaks && strpbrk (piece, "\t\n") != NULL)
        continue;
      size_t n = strlen (piece);
      if (len + n >= size || len + n > max_len)
        break;
      memcpy (out + len, piece, n + 1);
      len += n;
    }
}

/* Where random plans put their radiographs; "" for none. */
static char radiograph_root[HL_PATH_MAX];

static void
place (HlPlan *plan, HlLandmarkId id, double sign, double hx, double hy, double x_lat,
       double y)
{
  hl_landmarks_set (&plan->landmarks, id, hx + sign * x_lat, hy + y);
}

/* A plan around the invented geometry of model.md section 2, with every
 * field drawn at random within the range hl_plan_check accepts. */
static HlPlan *
random_plan (HlRand *r)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  memset (&plan->landmarks, 0, sizeof plan->landmarks);

  random_text (r, plan->label, sizeof plan->label, 60, false);
  plan->mass_kg = rand_uniform (r, 40.0, 140.0);
  plan->side = rand_chance (r, 0.5) ? HL_SIDE_RIGHT : HL_SIDE_LEFT;
  double sign = plan->side == HL_SIDE_RIGHT ? -1.0 : 1.0;

  plan->model.limb_table = (HlLimbTable) rand_int (r, HL_LIMB_N);
  plan->model.limb_fraction_custom = rand_uniform (r, 0.12, 0.25);
  plan->model.bw_line = rand_chance (r, 0.5) ? HL_BW_LINE_SEGMENTAL : HL_BW_LINE_MIDLINE;
  plan->model.abductor_line = rand_chance (r, 0.7) ? HL_ABDUCTOR_LINE_AUTO
                                                   : HL_ABDUCTOR_LINE_ANGLE;
  plan->model.abductor_angle_deg = rand_uniform (r, 55.0, 80.0);
  plan->model.lean_mm = rand_chance (r, 0.2) ? -0.0 : rand_uniform (r, 0.0, 20.0);

  double hx = sign * rand_uniform (r, 88.0, 100.0);
  double hy = rand_uniform (r, -10.0, 10.0);
  hl_landmarks_set (&plan->landmarks, HL_LM_HIP_CENTRE, hx, hy);
  hl_landmarks_set (&plan->landmarks, HL_LM_MIDLINE, rand_uniform (r, -4.0, 4.0),
                    rand_uniform (r, -40.0, -25.0));
  place (plan, HL_LM_ABDUCTOR_INSERTION, sign, hx, hy, rand_uniform (r, 55.0, 65.0),
         -rand_uniform (r, 0.0, 15.0));
  if (rand_chance (r, 0.7))
    place (plan, HL_LM_ABDUCTOR_ORIGIN, sign, hx, hy, rand_uniform (r, 10.0, 30.0),
           rand_uniform (r, 80.0, 100.0));
  if (rand_chance (r, 0.6))
    place (plan, HL_LM_TEARDROP, sign, hx, hy, -rand_uniform (r, 28.0, 36.0),
           -rand_uniform (r, 14.0, 22.0));
  if (rand_chance (r, 0.6))
    place (plan, HL_LM_LESSER_TROCHANTER, sign, hx, hy, rand_uniform (r, 15.0, 25.0),
           -rand_uniform (r, 50.0, 65.0));
  if (rand_chance (r, 0.6))
    {
      double px = rand_uniform (r, 30.0, 40.0), py = -rand_uniform (r, 75.0, 85.0);
      place (plan, HL_LM_SHAFT_PROXIMAL, sign, hx, hy, px, py);
      place (plan, HL_LM_SHAFT_DISTAL, sign, hx, hy, px - rand_uniform (r, 5.0, 10.0),
             py - rand_uniform (r, 90.0, 110.0));
    }
  /* The other hip, roughly mirrored about the midline. */
  double ox = -hx + rand_uniform (r, -3.0, 3.0), oy = hy + rand_uniform (r, -3.0, 3.0);
  if (rand_chance (r, 0.6))
    hl_landmarks_set (&plan->landmarks, HL_LM_HIP_CENTRE_OTHER, ox, oy);
  if (rand_chance (r, 0.6))
    place (plan, HL_LM_TEARDROP_OTHER, -sign, ox, oy, -rand_uniform (r, 28.0, 36.0),
           -rand_uniform (r, 14.0, 22.0));
  if (rand_chance (r, 0.6))
    place (plan, HL_LM_LESSER_TROCHANTER_OTHER, -sign, ox, oy, rand_uniform (r, 15.0, 25.0),
           -rand_uniform (r, 50.0, 65.0));
  if (rand_chance (r, 0.6))
    {
      double px = rand_uniform (r, 30.0, 40.0), py = -rand_uniform (r, 75.0, 85.0);
      place (plan, HL_LM_SHAFT_PROXIMAL_OTHER, -sign, ox, oy, px, py);
      place (plan, HL_LM_SHAFT_DISTAL_OTHER, -sign, ox, oy, px - rand_uniform (r, 5.0, 10.0),
             py - rand_uniform (r, 90.0, 110.0));
    }

  /* Calibration points take any value: edge cases of the number format. */
  static const double special[] = { -0.0, 4.9406564584124654e-324, 2.2250738585072014e-308,
                                    1e300, -123456789.125, 0.1, 1.0 / 3.0 };
  HlCalibration *cal = &plan->calibration;
  cal->method = (HlCalMethod) rand_int (r, 4);
  cal->magnification = rand_uniform (r, 1.1, 1.3);
  cal->marker_diameter_mm = rand_uniform (r, 20.0, 30.0);
  cal->known_distance_mm = rand_uniform (r, 50.0, 150.0);
  cal->n_points = rand_int (r, 4);
  /* Random points of a complete marker or two-point calibration would give
   * a random magnification, which the check refuses: keep those
   * calibrations half placed here (complete ones are tested on their own). */
  if (cal->method == HL_CAL_MARKER && cal->n_points > 2)
    cal->n_points = 2;
  if (cal->method == HL_CAL_TWO_POINT && cal->n_points > 1)
    cal->n_points = 1;
  for (int i = 0; i < cal->n_points; i++)
    {
      cal->points[i].x = rand_chance (r, 0.2)
                         ? special[rand_int (r, (int) (sizeof special / sizeof special[0]))]
                         : rand_uniform (r, -300.0, 300.0);
      cal->points[i].y = rand_uniform (r, -300.0, 300.0);
    }

  plan->cane.enabled = rand_chance (r, 0.5);
  plan->cane.hand = rand_chance (r, 0.8) ? HL_HAND_CONTRALATERAL : HL_HAND_IPSILATERAL;
  plan->cane.unit = (HlForceUnit) rand_int (r, 3);
  switch (plan->cane.unit)
    {
    case HL_FORCE_UNIT_PERCENT_BW:
      plan->cane.value = rand_uniform (r, 0.0, 20.0);
      break;
    case HL_FORCE_UNIT_KG:
      plan->cane.value = rand_uniform (r, 0.0, 0.2 * plan->mass_kg);
      break;
    case HL_FORCE_UNIT_N:
    default:
      plan->cane.value = rand_uniform (r, 0.0, 0.2 * plan->mass_kg * HL_GRAVITY);
      break;
    }
  plan->cane.distance_mm = rand_uniform (r, 200.0, 320.0);
  for (int h = 0; h < 2; h++)
    {
      plan->loads.hand[h].mass_kg = rand_chance (r, 0.4) ? rand_uniform (r, 0.0, 10.0) : 0.0;
      plan->loads.hand[h].distance_mm = rand_uniform (r, 150.0, 300.0);
    }
  plan->loads.midline_kg = rand_chance (r, 0.3) ? rand_uniform (r, 0.0, 10.0) : 0.0;

  plan->tol.global_offset_drop_mm = rand_uniform (r, 1.0, 15.0);
  plan->tol.leg_length_mm = rand_uniform (r, 1.0, 15.0);
  plan->tol.abductor_slack_mm = rand_uniform (r, 1.0, 15.0);
  plan->capacity.torque_nm_per_kg = rand_uniform (r, 0.5, 1.5);
  /* Few samples keep the summaries quick; the seed uses all 64 bits. */
  plan->uncertainty.n_samples = 1 + (size_t) rand_int (r, 500);
  plan->uncertainty.seed = rand_next (r);
  plan->uncertainty.landmark_sd_mm = rand_uniform (r, 0.0, 5.0);
  plan->uncertainty.magnification_sd = rand_uniform (r, 0.0, 0.05);
  plan->uncertainty.line_angle_sd_deg = rand_uniform (r, 0.0, 10.0);

  int n_options = rand_int (r, 6);
  for (int i = 0; i < n_options; i++)
    {
      HlRecon rc;
      char name[HL_NAME_MAX];
      hl_recon_init (&rc);
      rc.cup_medial_mm = rand_uniform (r, -5.0, 8.0);
      rc.cup_superior_mm = rand_uniform (r, -5.0, 8.0);
      rc.femoral_offset_mm = rand_uniform (r, -8.0, 10.0);
      rc.femoral_length_mm = rand_uniform (r, -8.0, 10.0);
      rc.head_length_mm = rand_uniform (r, -4.0, 8.0);
      rc.neck_shaft_angle_deg = rand_uniform (r, 120.0, 145.0);
      random_text (r, name, sizeof name, 40, false);
      /* Option names are unique (hl_plan_check). */
      snprintf (name + strlen (name), sizeof name - strlen (name), " %d", i + 1);
      ck_assert_int_ge (hl_plan_add_option (plan, name, &rc), 0);
    }
  random_text (r, plan->notes, sizeof plan->notes, 600, true);

  /* A radiograph reference under radiograph_root, which must be an
   * absolute folder without symbolic links: a file round trip stores the
   * path relative to the plan and reads it back absolute. */
  static const char *const image_names[] = {
    "images/case 1.png", "images/sub/r\xc3\xb6ntgen.tif", "pelvis.jpeg", "images/a&b<c>.png",
  };
  if (radiograph_root[0] != '\0' && rand_chance (r, 0.6))
    {
      HlRadiograph *rg = &plan->radiograph;
      hl_radiograph_init (rg);
      rg->present = true;
      const char *name = image_names[rand_int (r, (int) (sizeof image_names
                                                         / sizeof image_names[0]))];
      ck_assert_uint_lt (strlen (radiograph_root) + strlen (name) + 1, sizeof rg->path);
      memcpy (rg->path, radiograph_root, strlen (radiograph_root));
      rg->path[strlen (radiograph_root)] = '/';
      strcpy (rg->path + strlen (radiograph_root) + 1, name);
      if (rand_chance (r, 0.7))
        for (int i = 0; i < 64; i++)
          rg->sha256[i] = "0123456789abcdef"[rand_int (r, 16)];
      rg->pixel_spacing_mm = rand_uniform (r, HL_PIXEL_SPACING_MIN_MM, HL_PIXEL_SPACING_MAX_MM);
      rg->origin_mm.x = rand_uniform (r, -400.0, 100.0);
      rg->origin_mm.y = rand_uniform (r, -100.0, 400.0);
      rg->brightness = rand_uniform (r, HL_IMAGE_BRIGHTNESS_MIN, HL_IMAGE_BRIGHTNESS_MAX);
      rg->contrast = rand_uniform (r, HL_IMAGE_CONTRAST_MIN, HL_IMAGE_CONTRAST_MAX);
      rg->invert = rand_chance (r, 0.5);
      rg->opacity = rand_uniform (r, 0.0, 1.0);
      rg->schematic_visible = rand_chance (r, 0.5);
      if (rand_chance (r, 0.5))
        {
          rg->window_width = rand_uniform (r, HL_IMAGE_WINDOW_WIDTH_MIN, 65536.0);
          rg->window_centre = rand_uniform (r, 0.0, 65535.0);
        }
      rg->spacing_source = (HlSpacingSource) rand_int (r, HL_SPACING_IMAGER_DEFAULT + 1);
    }
  return plan;
}

/* ---- Round trips --------------------------------------------------------- */

static HlPlan *
load_text (const char *text, size_t size)
{
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  HlStatus st = hl_plan_load_buffer (text, size, "round-trip", &plan, &err);
  ck_assert_msg (st == HL_OK, "a written plan does not load: %s\n%s", err.message, text);
  return plan;
}

START_TEST (test_round_trip_random)
{
  HlRand r = { HL_ROUND_TRIP_SEED };
  char *dir = make_temp_dir ();
  ck_assert_ptr_nonnull (realpath (dir, radiograph_root));
  int n_radiographs = 0;
  char sub[HL_PATH_MAX + 16];
  snprintf (sub, sizeof sub, "%s/images", radiograph_root);
  ck_assert_int_eq (mkdir (sub, 0700), 0);
  snprintf (sub, sizeof sub, "%s/images/sub", radiograph_root);
  ck_assert_int_eq (mkdir (sub, 0700), 0);
  char **paths = calloc (2 * HL_ROUND_TRIP_PLANS, sizeof *paths);
  ck_assert_ptr_nonnull (paths);
  int n_paths = 0;
  int n_flagged = 0;
  char why[256];

  HlStderrCapture cap;
  capture_stderr_begin (&cap);
  for (int i = 0; i < HL_ROUND_TRIP_PLANS; i++)
    {
      HlPlan *plan = random_plan (&r);
      HlError err;
      hl_error_clear (&err);

      char *text = NULL;
      size_t size = 0;
      ck_assert_msg (hl_plan_to_buffer (plan, &text, &size, &err) == HL_OK,
                     "plan %d does not serialise: %s", i, err.message);
      ck_assert_uint_eq (strlen (text), size);

      HlPlan *back = load_text (text, size);
      ck_assert_msg (plans_equal (plan, back, why, sizeof why),
                     "plan %d differs after the round trip: %s", i, why);
      assert_same_results (plan, back, i);

      /* Writing what was read gives the same bytes. */
      char *again = NULL;
      ck_assert_int_eq (hl_plan_to_buffer (back, &again, NULL, &err), HL_OK);
      ck_assert_msg (strcmp (text, again) == 0, "plan %d: a second save differs", i);

      char path[HL_PATH_MAX];
      snprintf (path, sizeof path, "%s/plan-%03d%s", dir, i, HL_PLAN_FILE_EXTENSION);
      ck_assert_msg (hl_plan_save_file (plan, path, &err) == HL_OK, "save %s: %s", path,
                     err.message);
      paths[n_paths++] = strdup (path);
      HlPlan *from_file = NULL;
      ck_assert_msg (hl_plan_load_file (path, &from_file, &err) == HL_OK, "load %s: %s",
                     path, err.message);
      ck_assert_msg (plans_equal (plan, from_file, why, sizeof why),
                     "plan %d differs after a file round trip: %s", i, why);
      if (plan->radiograph.present)
        {
          /* On disk the path is relative to the plan's folder. */
          char *saved = read_whole_file (path, NULL);
          ck_assert_msg (strstr (saved, radiograph_root) == NULL,
                         "plan %d: the saved radiograph path is not relative", i);
          ck_assert_msg (strstr (saved, "<radiograph path=\"") != NULL, "plan %d", i);
          free (saved);
          n_radiographs++;
        }

      snprintf (path, sizeof path, "%s/summary-%03d.xml", dir, i);
      ck_assert_msg (hl_summary_save_file (plan, path, &err) == HL_OK, "summary %s: %s",
                     path, err.message);
      paths[n_paths++] = strdup (path);
      HlPlan *from_summary = NULL;
      ck_assert_msg (hl_plan_load_file (path, &from_summary, &err) == HL_OK,
                     "load summary %s: %s", path, err.message);
      ck_assert_msg (plans_equal (plan, from_summary, why, sizeof why),
                     "plan %d differs after a summary round trip: %s", i, why);

      char *summary = read_whole_file (path, NULL);
      if (strstr (summary, "<flag key=") != NULL)
        n_flagged++;
      free (summary);

      free (text);
      free (again);
      hl_plan_free (plan);
      hl_plan_free (back);
      hl_plan_free (from_file);
      hl_plan_free (from_summary);
    }
  char *noise = capture_stderr_end (&cap);
  ck_assert_msg (noise[0] == '\0', "the file module printed to stderr: %s", noise);
  free (noise);

  /* The random plans must exercise the flag output too. */
  ck_assert_msg (n_flagged > 0, "no random plan raised a flag");
  ck_assert_msg (n_radiographs > 0, "no random plan held a radiograph");
  radiograph_root[0] = '\0';

  xmllint_validate (paths, n_paths);
  for (int i = 0; i < n_paths; i++)
    free (paths[i]);
  free (paths);
  ck_assert_int_eq (count_entries (dir, "."), 2);   /* "." and "..": no temp files */
  remove_tree (dir);
}
END_TEST

static const char *const examples[] = { "demo.hlplan", "demo-left.hlplan", "minimal.hlplan" };

START_TEST (test_examples_load_and_validate)
{
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/%s", HL_EXAMPLES_DIR, examples[_i]);
  xmllint_validate_one (path);

  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_load_file (path, &plan, &err) == HL_OK, "%s: %s", path, err.message);
  ck_assert_msg (strstr (plan->notes, "Invented") != NULL,
                 "%s: the notes do not say the case is invented", path);
  char *text = read_whole_file (path, NULL);
  ck_assert_msg (strstr (text, "<!--") != NULL && strstr (text, "invented") != NULL,
                 "%s: no XML comment saying the case is invented", path);
  free (text);

  HlResult results[8];
  ck_assert_uint_lt (plan->n_options, sizeof results / sizeof results[0]);
  ck_assert_msg (hl_plan_solve_all (plan, results, &err) == HL_OK, "%s: %s", path,
                 err.message);
  hl_plan_free (plan);
}
END_TEST

/* The demo cases' geometry gives single-leg-stance values in the range of
 * model.md section 2 once aids are taken away: abductor force 1.5-2.5 BW
 * and joint force 2.2-3.5 BW (static stance in vivo 2.1-2.8 BW: Kotzar et
 * al. 1991, J Orthop Res 9:621-633, read in the abstract). */
#define HL_DEMO_ABDUCTOR_MIN_BW 1.5
#define HL_DEMO_ABDUCTOR_MAX_BW 2.5
#define HL_DEMO_JOINT_MIN_BW 2.2
#define HL_DEMO_JOINT_MAX_BW 3.5

START_TEST (test_examples_plausible)
{
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/%s", HL_EXAMPLES_DIR, examples[_i]);
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (path, &plan, &err), HL_OK);
  plan->cane.enabled = false;
  plan->loads.hand[0].mass_kg = plan->loads.hand[1].mass_kg = plan->loads.midline_kg = 0.0;
  HlResult res;
  hl_test_solve (plan, NULL, &res);
  ck_assert_msg (res.abductor_force_bw >= HL_DEMO_ABDUCTOR_MIN_BW
                 && res.abductor_force_bw <= HL_DEMO_ABDUCTOR_MAX_BW,
                 "%s: abductor force %.3f BW", path, res.abductor_force_bw);
  ck_assert_msg (res.jrf_bw >= HL_DEMO_JOINT_MIN_BW && res.jrf_bw <= HL_DEMO_JOINT_MAX_BW,
                 "%s: joint force %.3f BW", path, res.jrf_bw);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_demo_contents)
{
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/demo.hlplan", &plan, &err), HL_OK);
  ck_assert_int_eq (plan->side, HL_SIDE_RIGHT);
  ck_assert (same_double (plan->mass_kg, 72.5));
  ck_assert_uint_eq (plan->n_options, 4);
  /* the fourth option is templated from the bundled demo catalogue */
  ck_assert (plan->options[3].recon.tmpl.on);
  ck_assert_str_eq (plan->options[3].recon.tmpl.catalogue, "hiplever-demo");
  ck_assert (plan->radiograph.present);
  ck_assert_msg (plan->landmarks.placed == (1u << HL_LM_COUNT) - 1,
                 "demo.hlplan must place every landmark (mask %#x)", plan->landmarks.placed);
  ck_assert (plan->cane.enabled);
  ck_assert_int_eq (plan->cane.hand, HL_HAND_CONTRALATERAL);
  ck_assert_int_eq (plan->cane.unit, HL_FORCE_UNIT_PERCENT_BW);
  ck_assert (same_double (plan->cane.value, 15.0));
  ck_assert (same_double (plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg, 4.0));
  ck_assert (same_double (plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg, 0.0));
  hl_plan_free (plan);

  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/demo-left.hlplan", &plan, &err), HL_OK);
  ck_assert_int_eq (plan->side, HL_SIDE_LEFT);
  ck_assert_uint_eq (plan->n_options, 2);
  ck_assert (!plan->cane.enabled);
  hl_plan_free (plan);

  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/minimal.hlplan", &plan, &err), HL_OK);
  uint32_t required = 0;
  for (int i = 0; i < HL_LM_COUNT; i++)
    if (hl_landmark_info ((HlLandmarkId) i)->required)
      required |= 1u << i;
  ck_assert_uint_eq (plan->landmarks.placed, required);
  ck_assert_int_eq (plan->model.abductor_line, HL_ABDUCTOR_LINE_ANGLE);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_schema_text)
{
  char *file = read_whole_file (HL_SCHEMA_PATH, NULL);
  ck_assert_str_eq (hl_plan_schema_text (), file);
  free (file);
}
END_TEST

/* ---- The planning summary -------------------------------------------- */

static const char *
plan_element (const char *text, size_t *len)
{
  const char *start = strstr (text, "<plan ");
  ck_assert_ptr_nonnull (start);
  const char *end = strstr (start, "</plan>");
  ck_assert_ptr_nonnull (end);
  *len = (size_t) (end + strlen ("</plan>") - start);
  return start;
}

static double
summary_value (const char *from, const char *attr)
{
  char key[64];
  snprintf (key, sizeof key, " %s=\"", attr);
  const char *p = strstr (from, key);
  ck_assert_msg (p != NULL, "no %s in the summary", attr);
  return strtod (p + strlen (key), NULL);
}

START_TEST (test_summary_examples)
{
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/%s", HL_EXAMPLES_DIR, examples[_i]);
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (path, &plan, &err), HL_OK);

  char *summary = NULL;
  size_t size = 0;
  ck_assert_msg (hl_summary_to_buffer (plan, HL_SUMMARY_DATE, &summary, &size, &err) == HL_OK,
                 "%s: %s", path, err.message);
  ck_assert_uint_eq (strlen (summary), size);

  ck_assert_msg (strstr (summary, hl_caution_text ()) != NULL, "no caution in the summary");
  ck_assert_ptr_nonnull (strstr (summary, "created=\"" HL_SUMMARY_DATE "\""));
  ck_assert_ptr_nonnull (strstr (summary, "model-version=\"" HL_MODEL_VERSION "\""));
  char version[128];
  snprintf (version, sizeof version, "program-version=\"%s\"", hl_program_version ());
  ck_assert_ptr_nonnull (strstr (summary, version));

  /* The digest: 64 hex digits, the SHA-256 of the plan element, which is
   * the same bytes as in the plan file written from the same plan. */
  const char *d = strstr (summary, "plan-sha256=\"");
  ck_assert_ptr_nonnull (d);
  d += strlen ("plan-sha256=\"");
  enum { HEX = 64 };
  char digest[HEX + 1];
  memcpy (digest, d, HEX);
  digest[HEX] = '\0';
  ck_assert_int_eq (d[HEX], '"');
  ck_assert_uint_eq (strspn (digest, "0123456789abcdef"), HEX);

  size_t len;
  const char *element = plan_element (summary, &len);
  gchar *hex = g_compute_checksum_for_data (G_CHECKSUM_SHA256,
                                            (const guchar *) element, len);
  ck_assert_str_eq (hex, digest);
  g_free (hex);

  char *plan_text = NULL;
  ck_assert_int_eq (hl_plan_to_buffer (plan, &plan_text, NULL, &err), HL_OK);
  size_t plan_len;
  const char *plan_part = plan_element (plan_text, &plan_len);
  ck_assert_uint_eq (plan_len, len);
  ck_assert (memcmp (plan_part, element, len) == 0);

  /* One result per option plus native, with the solver's numbers exactly. */
  HlResult results[8];
  ck_assert_int_eq (hl_plan_solve_all (plan, results, &err), HL_OK);
  int n_results = 0;
  for (const char *p = summary; (p = strstr (p, "<result ")) != NULL; p++)
    n_results++;
  ck_assert_int_eq (n_results, (int) plan->n_options + 1);
  const char *native = strstr (summary, "<result kind=\"native\"");
  ck_assert_ptr_nonnull (native);
  ck_assert (same_double (summary_value (native, "joint-force-bw"), results[0].jrf_bw));
  ck_assert (same_double (summary_value (native, "abductor-force-n"),
                          results[0].abductor_force_n));
  ck_assert (same_double (summary_value (native, "joint-force-angle-deg"),
                          hl_result_jrf_angle_deg (&results[0])));
  for (size_t i = 0; i < plan->n_options; i++)
    {
      char key[160];
      snprintf (key, sizeof key, "option-index=\"%zu\" option-name=\"%s\"", i,
                plan->options[i].name);
      const char *opt = strstr (summary, key);
      ck_assert_msg (opt != NULL, "no result for option %zu", i);
      ck_assert (same_double (summary_value (opt, "joint-force-n"), results[1 + i].jrf_n));
    }

  /* Opening the summary gives the plan back. */
  HlPlan *back = NULL;
  ck_assert_msg (hl_plan_load_buffer (summary, size, "summary", &back, &err) == HL_OK,
                 "%s", err.message);
  char why[256];
  ck_assert_msg (plans_equal (plan, back, why, sizeof why), "%s", why);

  char *dir = make_temp_dir ();
  char out[HL_PATH_MAX];
  snprintf (out, sizeof out, "%s/summary.xml", dir);
  write_whole_file (out, summary, size);
  xmllint_validate_one (out);
  snprintf (out, sizeof out, "%s/saved-summary.xml", dir);
  ck_assert_int_eq (hl_summary_save_file (plan, out, &err), HL_OK);
  xmllint_validate_one (out);
  remove_tree (dir);

  free (plan_text);
  free (summary);
  hl_plan_free (back);
  hl_plan_free (plan);
}
END_TEST

/* The summary's <result> attributes are the result-field table's summary
 * fields, in their order, each with the solver's number. */
START_TEST (test_summary_fields_from_table)
{
  const HlResultField *fields[HL_RESULT_FIELD_MAX];
  size_t n = hl_result_fields_summary (fields);
  ck_assert_uint_gt (n, 0);
  for (size_t k = 0; k < n; k++)
    {
      ck_assert_int_eq (fields[k]->summary_order, (int) k + 1);
      ck_assert_ptr_nonnull (fields[k]->xml);
    }

  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/demo.hlplan", &plan, &err), HL_OK);
  char *summary = NULL;
  size_t size = 0;
  ck_assert_int_eq (hl_summary_to_buffer (plan, HL_SUMMARY_DATE, &summary, &size, &err),
                    HL_OK);
  HlResult results[8];
  ck_assert_int_eq (hl_plan_solve_all (plan, results, &err), HL_OK);
  const char *native = strstr (summary, "<result kind=\"native\"");
  ck_assert_ptr_nonnull (native);
  const char *end = strchr (native, '>');
  const char *at = native;
  for (size_t k = 0; k < n; k++)
    {
      char key[80];
      snprintf (key, sizeof key, " %s=\"", fields[k]->xml);
      const char *p = strstr (at, key);
      ck_assert_msg (p != NULL && p < end, "%s is not in order in <result>", fields[k]->xml);
      double v = g_ascii_strtod (p + strlen (key), NULL);
      double want = fields[k]->get (&results[0]);
      ck_assert_msg (v == want || (isnan (v) && isnan (want)), "%s: %.17g, not %.17g",
                     fields[k]->xml, v, want);
      at = p + 1;
    }
  free (summary);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_summary_refusals)
{
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/demo.hlplan", &plan, &err), HL_OK);

  static const char *const bad_dates[] = {
    "yesterday", "2026-13-01T00:00:00Z", "2026-02-30T00:00:00Z", "2026-03-01 09:30:00Z",
    "2026-03-01T09:30:00", "2026-03-01T24:00:00Z", "",
  };
  for (size_t i = 0; i < sizeof bad_dates / sizeof bad_dates[0]; i++)
    {
      char *out = (char *) "untouched";
      ck_assert_int_eq (hl_summary_to_buffer (plan, bad_dates[i], &out, NULL, &err),
                        HL_ERR_INVALID);
      ck_assert_str_eq (out, "untouched");
      ck_assert_msg (strstr (err.message, "ISO 8601") != NULL, "%s", err.message);
    }
  static const char *const good_dates[] = {
    "2024-02-29T23:59:59Z", "2026-03-01T09:30:00.125Z", "2026-03-01T09:30:00+01:00",
  };
  for (size_t i = 0; i < sizeof good_dates / sizeof good_dates[0]; i++)
    {
      char *out = NULL;
      ck_assert_msg (hl_summary_to_buffer (plan, good_dates[i], &out, NULL, &err) == HL_OK,
                     "%s: %s", good_dates[i], err.message);
      free (out);
    }

  /* A midline on the operated side cannot be solved: the summary carries
   * the plan and the solver's refusal in its own element, with no result
   * and no range, and loads back; the command line's variant fails with
   * the solver's status and message and makes nothing. */
  HlLandmarks lm = plan->landmarks;
  plan->landmarks.p[HL_LM_MIDLINE].x = plan->landmarks.p[HL_LM_HIP_CENTRE].x - 40.0;
  HlModel model;
  HlError expect;
  hl_error_clear (&expect);
  HlStatus st = hl_model_prepare (&model, plan, &expect);
  ck_assert_int_ne (st, HL_OK);
  char *out = NULL;
  size_t n_out = 0;
  ck_assert_int_eq (hl_summary_to_buffer (plan, HL_SUMMARY_DATE, &out, &n_out, &err), HL_OK);
  ck_assert_ptr_nonnull (strstr (out, "<refusal kind=\"plan\" field=\"landmark midline\""
                                      " landmark=\"midline\">"));
  ck_assert_ptr_nonnull (strstr (out, expect.message));
  ck_assert_ptr_null (strstr (out, "<result "));
  ck_assert_ptr_null (strstr (out, "uncertainty-samples-used"));
  HlPlan *back = NULL;
  ck_assert_msg (hl_plan_load_buffer (out, n_out, "s.xml", &back, &err) == HL_OK, "%s",
                 err.message);
  ck_assert_double_eq (back->landmarks.p[HL_LM_MIDLINE].x,
                       plan->landmarks.p[HL_LM_MIDLINE].x);
  hl_plan_free (back);
  free (out);
  out = (char *) "untouched";
  ck_assert_int_eq (hl_summary_to_buffer_solved (plan, HL_SUMMARY_DATE, &out, NULL, &err), st);
  ck_assert_str_eq (out, "untouched");
  ck_assert_str_eq (err.message, expect.message);
  plan->landmarks = lm;
  hl_plan_free (plan);
}
END_TEST

/* ---- What the writer refuses ----------------------------------------- */

typedef enum {
  HL_SPOIL_CANE_NAN,
  HL_SPOIL_LABEL_CONTROL,
  HL_SPOIL_OPTION_UTF8,
  HL_SPOIL_NOTES_UTF8,
  HL_SPOIL_NO_HIP_CENTRE,
  HL_SPOIL_CAL_POINTS,
  HL_SPOIL_CAL_INF,
  HL_SPOIL_N
} HlSpoil;

static const struct {
  HlSpoil spoil;
  HlStatus status;
  const char *expect;
} write_refusals[] = {
  { HL_SPOIL_CANE_NAN, HL_ERR_INVALID, "cane force" },
  { HL_SPOIL_LABEL_CONTROL, HL_ERR_INVALID, "control character" },
  { HL_SPOIL_OPTION_UTF8, HL_ERR_INVALID, "UTF-8" },
  { HL_SPOIL_NOTES_UTF8, HL_ERR_INVALID, "notes" },
  { HL_SPOIL_NO_HIP_CENTRE, HL_ERR_INVALID, "Hip centre" },
  { HL_SPOIL_CAL_POINTS, HL_ERR_INVALID, "calibration points" },
  { HL_SPOIL_CAL_INF, HL_ERR_INVALID, "calibration point" },
};

START_TEST (test_write_refusal)
{
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/demo.hlplan", &plan, &err), HL_OK);
  switch (write_refusals[_i].spoil)
    {
    case HL_SPOIL_CANE_NAN:
      plan->cane.enabled = false;
      plan->cane.value = NAN;
      break;
    case HL_SPOIL_LABEL_CONTROL:
      snprintf (plan->label, sizeof plan->label, "bell \a here");
      break;
    case HL_SPOIL_OPTION_UTF8:
      snprintf (plan->options[1].name, sizeof plan->options[1].name, "bad \xc3 byte");
      break;
    case HL_SPOIL_NOTES_UTF8:
      snprintf (plan->notes, sizeof plan->notes, "overlong \xc0\xaf slash");
      break;
    case HL_SPOIL_NO_HIP_CENTRE:
      hl_landmarks_unset (&plan->landmarks, HL_LM_HIP_CENTRE);
      break;
    case HL_SPOIL_CAL_POINTS:
      plan->calibration.n_points = 4;
      break;
    case HL_SPOIL_CAL_INF:
      plan->calibration.points[2].y = INFINITY;
      break;
    case HL_SPOIL_N:
    default:
      ck_abort ();
    }

  char *out = (char *) "untouched";
  HlStatus st = hl_plan_to_buffer (plan, &out, NULL, &err);
  ck_assert_int_eq (st, write_refusals[_i].status);
  ck_assert_int_eq (err.status, st);
  ck_assert_str_eq (out, "untouched");
  ck_assert_msg (hl_test_contains_ci (err.message, write_refusals[_i].expect)
                 || hl_test_contains_ci (err.field, write_refusals[_i].expect),
                 "message \"%s\" (field \"%s\") does not mention \"%s\"", err.message,
                 err.field, write_refusals[_i].expect);

  /* Saving over an existing file leaves it as it was, and no temporary. */
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/kept.hlplan", dir);
  write_whole_file (path, "previous contents\n", 18);
  ck_assert_int_eq (hl_plan_save_file (plan, path, &err), st);
  ck_assert_int_ne (hl_summary_save_file (plan, path, &err), HL_OK);
  char *kept = read_whole_file (path, NULL);
  ck_assert_str_eq (kept, "previous contents\n");
  free (kept);
  ck_assert_int_eq (count_entries (dir, ".kept"), 0);
  remove_tree (dir);
  hl_plan_free (plan);
}
END_TEST

/* ---- Bad input ---------------------------------------------------------- */

#define XML_DECL "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
#define PLAN_OPEN "<plan xmlns=\"urn:hiplever:plan\" format-version=\"1\">\n"
#define CASE_OK "  <case label=\"Bad input\" mass-kg=\"72.5\" operated-side=\"right\"/>\n"
#define LM_HIP "    <landmark name=\"hip-centre\" x-mm=\"-95\" y-mm=\"0\"/>\n"
#define LM_MID "    <landmark name=\"midline\" x-mm=\"0\" y-mm=\"-35\"/>\n"
#define LM_INS "    <landmark name=\"abductor-insertion\" x-mm=\"-155\" y-mm=\"-8\"/>\n"
#define LANDMARKS_OK "  <landmarks>\n" LM_HIP LM_MID LM_INS "  </landmarks>\n"
#define PLAN_CLOSE "</plan>\n"
/* Line numbers in the documents above: 1 declaration, 2 <plan>, 3 <case>,
 * 4 <landmarks>, 5 hip centre, 6 midline, 7 insertion, 8 </landmarks>. */

#define HL_ANY_LINE (-1)

typedef struct {
  const char *what;
  const char *text;        /* the document, or NULL for a fixture */
  const char *fixture;     /* a file in tests/files */
  HlStatus status;
  int line;                /* expected HlError.line, or HL_ANY_LINE (> 0) */
  const char *expect[3];   /* substrings of the message */
  const char *forbid;      /* must not appear in the message */
} HlBadCase;

static const HlBadCase bad_cases[] = {
  { "malformed XML", XML_DECL PLAN_OPEN "  <case label=\"x\"\n" LANDMARKS_OK PLAN_CLOSE,
    NULL, HL_ERR_PARSE, HL_ANY_LINE, { "not well-formed" }, NULL },
  { "unclosed root", XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK, NULL, HL_ERR_PARSE,
    HL_ANY_LINE, { "not well-formed", "plan" }, NULL },
  { "wrong root", XML_DECL "<svg xmlns=\"urn:hiplever:plan\" format-version=\"1\"/>\n",
    NULL, HL_ERR_PARSE, 2, { "line 2", "<svg>", "not <plan>" }, NULL },
  { "wrong namespace",
    XML_DECL "<plan xmlns=\"urn:example:other\" format-version=\"1\">\n" CASE_OK
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 2,
    { "line 2", "urn:example:other", HL_PLAN_NAMESPACE }, NULL },
  { "no namespace", XML_DECL "<plan format-version=\"1\">\n" CASE_OK LANDMARKS_OK PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 2, { "line 2", "no namespace" }, NULL },
  { "newer format version (checked before the schema)",
    XML_DECL "<plan xmlns=\"urn:hiplever:plan\" format-version=\"99\">\n"
    "  <hologram/>\n" PLAN_CLOSE, NULL, HL_ERR_VERSION, 2,
    { "line 2, element <plan>", "format version 99", "newer" }, NULL },
  { "format version not a number",
    XML_DECL "<plan xmlns=\"urn:hiplever:plan\" format-version=\"one\">\n" CASE_OK
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 2, { "format-version", "'one'" }, NULL },
  { "format version missing",
    XML_DECL "<plan xmlns=\"urn:hiplever:plan\">\n" CASE_OK LANDMARKS_OK PLAN_CLOSE, NULL,
    HL_ERR_PARSE, 2, { "format-version", "missing" }, NULL },
  { "missing hip centre",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_MID LM_INS "  </landmarks>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 4, { "line 4, element <landmarks>", "hip-centre",
                             "place at least the hip centre, the midline and the abductor insertion" },
    "Expected is" },
  { "missing abductor insertion",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP LM_MID "  </landmarks>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 4, { "abductor-insertion", "lacks the required landmark" }, NULL },
  /* An empty or incomplete plan is told in plain words, not schema text. */
  { "no landmarks element",
    XML_DECL PLAN_OPEN CASE_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 2,
    { "the plan has no landmarks: place at least the hip centre, the midline and "
      "the abductor insertion" }, "Expected is" },
  { "empty landmarks element",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks/>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 4,
    { "the plan has no landmarks: place at least the hip centre, the midline and "
      "the abductor insertion" }, "Expected is" },
  { "only the midline",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_MID "  </landmarks>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 4, { "landmarks Hip centre (hip-centre), Abductor insertion "
                             "(abductor-insertion)", "place at least" }, "Expected is" },
  { "an empty plan element",
    XML_DECL "<plan xmlns=\"urn:hiplever:plan\" format-version=\"1\"/>\n", NULL,
    HL_ERR_PARSE, 2, { "the plan has no case", "operated side" }, "Expected is" },
  { "a summary whose plan has no landmarks",
    XML_DECL "<planning-summary xmlns=\"urn:hiplever:plan\" format-version=\"1\">\n"
    PLAN_OPEN CASE_OK PLAN_CLOSE "</planning-summary>\n", NULL, HL_ERR_PARSE, 3,
    { "the plan has no landmarks" }, "Expected is" },
  { "an encoding declaration naming an encoding that is not read",
    "<?xml version=\"1.0\" encoding=\"klingon\"?>\n" PLAN_OPEN CASE_OK LANDMARKS_OK
    PLAN_CLOSE, NULL, HL_ERR_PARSE, 1,
    { "line 1", "names the encoding 'klingon', which is not read", "UTF-8" },
    "Unsupported" },
  /* The schema's findings in our words, never libxml2's ("This element is
   * not expected. Expected is ( ... )", "identity-constraint", ...). */
  { "schema: an element out of place",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <hologram/>\n" PLAN_CLOSE, NULL,
    HL_ERR_PARSE, 9, { "line 9, element <hologram>", "does not belong here; expected here: ",
                       "options, catalogues, notes" }, "{urn" },
  { "schema: an attribute an element cannot have",
    XML_DECL PLAN_OPEN
    "  <case label=\"x\" mass-kg=\"72.5\" operated-side=\"right\" colour=\"red\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3,
    { "line 3, element <case>", "the attribute colour is not one this element can have" },
    "not allowed" },
  { "schema: a required attribute missing",
    XML_DECL PLAN_OPEN "  <case label=\"x\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3,
    { "the attribute mass-kg is missing" }, "required but missing" },
  { "schema: text among elements",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>hello\n" LM_HIP LM_MID LM_INS
    "  </landmarks>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 4,
    { "holds text, where only elements belong" }, "element-only" },
  { "schema: a landmark twice",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP LM_HIP LM_MID LM_INS
    "  </landmarks>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 6,
    { "the name 'hip-centre' is used twice" }, "identity-constraint" },
  { "schema: xml:lang",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <notes xml:lang=\"de\">x</notes>\n"
    PLAN_CLOSE, NULL, HL_ERR_PARSE, 9,
    { "the attribute xml:lang is not one this element can have" }, "{http" },
  /* Magnification limits 1.0-1.5 (HL_MAGNIFICATION_MIN/MAX): AP pelvis
   * magnification 117-123.4% (Brew et al. 2012, J Arthroplasty
   * 27:643-647); the margin is common practice.  Each calibration method. */
  { "typed magnification below 1.0",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"typed\" magnification=\"0.95\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "magnification", "0.95", "between 1 and 1.5" }, NULL },
  { "typed magnification above 1.5",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"typed\" magnification=\"1.55\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "magnification", "1.55", "between 1 and 1.5" }, NULL },
  { "marker calibration at 1.7",   /* radius 21.25 mm over a 25 mm sphere */
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"marker\" marker-diameter-mm=\"25\">\n"
    "    <point x-mm=\"21.25\" y-mm=\"0\"/>\n    <point x-mm=\"0\" y-mm=\"21.25\"/>\n"
    "    <point x-mm=\"-21.25\" y-mm=\"0\"/>\n  </calibration>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "magnification comes out at 1.700", "1.00 and 1.50" }, NULL },
  { "two-point calibration at 0.9",   /* 90 mm apart, 100 mm true */
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"two-point\" known-distance-mm=\"100\">\n"
    "    <point x-mm=\"0\" y-mm=\"0\"/>\n    <point x-mm=\"90\" y-mm=\"0\"/>\n"
    "  </calibration>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "magnification comes out at 0.900", "1.00 and 1.50" }, NULL },
  /* Points giving 1.300 (radius 16.25 mm, 25 mm sphere) under a recorded
   * 1.2: the landmarks were scaled with another magnification. */
  { "calibration points contradict the recorded magnification",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"marker\" magnification=\"1.2\" marker-diameter-mm=\"25\">\n"
    "    <point x-mm=\"16.25\" y-mm=\"0\"/>\n    <point x-mm=\"0\" y-mm=\"16.25\"/>\n"
    "    <point x-mm=\"-16.25\" y-mm=\"0\"/>\n  </calibration>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 9, { "line 9", "give a magnification of 1.300",
                             "records 1.200" }, NULL },
  /* A far-out recorded magnification is written as a number, not 300
   * digits; a ratio's range has no stray spaces where a unit would be. */
  { "calibration points against a recorded magnification of 1e+308",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"marker\" magnification=\"1e+308\" marker-diameter-mm=\"25\">\n"
    "    <point x-mm=\"16.25\" y-mm=\"0\"/>\n    <point x-mm=\"0\" y-mm=\"16.25\"/>\n"
    "    <point x-mm=\"-16.25\" y-mm=\"0\"/>\n  </calibration>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 9, { "give a magnification of 1.300", "records 1e+308:" },
    "0000000000" },
  { "typed magnification of 1e+308",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"typed\" magnification=\"1e+308\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "is 1e+308: it must be between 1 and 1.5" }, " : " },
  { "text where a number belongs",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n"
    "    <landmark name=\"hip-centre\" x-mm=\"abc\" y-mm=\"0\"/>\n" LM_MID LM_INS
    "  </landmarks>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 5,
    { "line 5, element <landmark name=\"hip-centre\">: attribute x-mm is 'abc', not a number" },
    NULL },
  { "nan", XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP
    "    <landmark name=\"midline\" x-mm=\"0\" y-mm=\"nan\"/>\n" LM_INS "  </landmarks>\n"
    PLAN_CLOSE, NULL, HL_ERR_PARSE, 6,
    { "line 6", "<landmark name=\"midline\">", "y-mm is 'nan', not a finite number" }, NULL },
  { "INF (valid xs:double, refused)",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"INF\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3,
    { "line 3, element <case>", "mass-kg", "not a finite number" }, NULL },
  { "overflow to infinity",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"1e999\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3, { "mass-kg", "not a finite number" },
    NULL },
  { "hexadecimal number",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"0x48\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3, { "mass-kg is '0x48', not a number" },
    NULL },
  { "decimal comma",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"72,5\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3, { "mass-kg is '72,5', not a number" },
    NULL },
  { "empty number",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3, { "mass-kg is '', not a number" }, NULL },
  { "mass out of range (hl_plan_check)",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"10\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_INVALID, 3,
    { "line 3, element <case>", "body mass", "10 kg" }, NULL },
  { "option out of range (hl_plan_check)",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <options>\n"
    "    <option name=\"Fine\"/>\n"
    "    <option name=\"Too far\" cup-medial-mm=\"80\"/>\n  </options>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 11, { "line 11", "<option name=\"Too far\">", "cup medialisation" },
    NULL },
  { "landmark out of range (hl_plan_check)",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP LM_MID LM_INS
    "    <landmark name=\"teardrop\" x-mm=\"-60\" y-mm=\"-9000\"/>\n"
    "  </landmarks>\n" PLAN_CLOSE, NULL, HL_ERR_INVALID, 8,
    { "line 8", "<landmark name=\"teardrop\">" }, NULL },
  { "unknown landmark",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP LM_MID LM_INS
    "    <landmark name=\"kneecap\" x-mm=\"1\" y-mm=\"2\"/>\n  </landmarks>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 8, { "line 8", "kneecap", "unknown landmark" }, NULL },
  { "landmark twice",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP LM_MID LM_INS LM_HIP
    "  </landmarks>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 8, { "line 8", "hip-centre" }, NULL },
  { "unknown attribute",
    XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n" LM_HIP LM_MID
    "    <landmark name=\"abductor-insertion\" x-mm=\"-155\" y-mm=\"-8\" z-mm=\"3\"/>\n"
    "  </landmarks>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 7,
    { "line 7", "<landmark name=\"abductor-insertion\">", "z-mm" }, NULL },
  { "uncertainty SD out of range (hl_plan_check)",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <uncertainty samples=\"500\" seed=\"7\" landmark-sd-mm=\"25\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "line 9", "<uncertainty>", "landmark placement error" }, NULL },
  { "uncertainty angle SD negative (hl_plan_check)",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <uncertainty angle-sd-deg=\"-1\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_INVALID, 9, { "line 9", "abductor line angle error" }, NULL },
  { "uncertainty samples zero (schema)",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <uncertainty samples=\"0\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 9, { "line 9", "samples" }, NULL },
  { "uncertainty samples over the limit (schema)",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <uncertainty samples=\"200001\"/>\n"
    PLAN_CLOSE, NULL, HL_ERR_PARSE, 9, { "line 9", "samples" }, NULL },
  { "uncertainty seed negative (schema)",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <uncertainty seed=\"-5\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 9, { "line 9", "seed" }, NULL },
  { "unknown element",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <colour value=\"red\"/>\n" PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 9, { "line 9", "colour" }, NULL },
  { "elements out of order",
    XML_DECL PLAN_OPEN LANDMARKS_OK CASE_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, HL_ANY_LINE,
    { "landmarks" }, NULL },
  { "missing case",
    XML_DECL PLAN_OPEN LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, HL_ANY_LINE,
    { "case" }, NULL },
  { "bad side",
    XML_DECL PLAN_OPEN "  <case label=\"x\" mass-kg=\"70\" operated-side=\"middle\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3,
    { "line 3", "operated-side is 'middle', not one of: right, left" }, NULL },
  { "unknown limb table",
    XML_DECL PLAN_OPEN CASE_OK "  <model limb-table=\"guesswork\"/>\n" LANDMARKS_OK
    PLAN_CLOSE, NULL, HL_ERR_PARSE, 4, { "line 4", "<model>", "guesswork" }, NULL },
  { "label too long",
    XML_DECL PLAN_OPEN "  <case label=\""
    "xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx"
    "xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx"
    "\" mass-kg=\"70\" operated-side=\"right\"/>\n" LANDMARKS_OK PLAN_CLOSE,
    NULL, HL_ERR_PARSE, 3, { "line 3", "label", "178 bytes" }, NULL },
  { "four calibration points",
    XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK "  <calibration method=\"marker\">\n"
    "    <point x-mm=\"1\" y-mm=\"1\"/>\n    <point x-mm=\"2\" y-mm=\"1\"/>\n"
    "    <point x-mm=\"3\" y-mm=\"2\"/>\n    <point x-mm=\"4\" y-mm=\"5\"/>\n"
    "  </calibration>\n" PLAN_CLOSE, NULL, HL_ERR_PARSE, 13, { "line 13", "point" }, NULL },
  { "text inside the plan",
    XML_DECL PLAN_OPEN CASE_OK "  stray words\n" LANDMARKS_OK PLAN_CLOSE, NULL,
    HL_ERR_PARSE, HL_ANY_LINE, { "plan" }, NULL },
  { "undeclared entity", XML_DECL PLAN_OPEN
    "  <case label=\"&thing;\" mass-kg=\"70\" operated-side=\"right\"/>\n"
    LANDMARKS_OK PLAN_CLOSE, NULL, HL_ERR_PARSE, 3, { "line 3", "thing" }, NULL },
  { "summary without its plan",
    XML_DECL "<planning-summary xmlns=\"urn:hiplever:plan\" format-version=\"1\">\n"
    "<caution>x</caution>\n</planning-summary>\n", NULL, HL_ERR_PARSE, HL_ANY_LINE,
    { "planning-summary" }, NULL },
  { "summary of a newer version",
    XML_DECL "<planning-summary xmlns=\"urn:hiplever:plan\" format-version=\"2\">\n"
    "<caution>x</caution>\n</planning-summary>\n", NULL, HL_ERR_VERSION, 2,
    { "format version 2" }, NULL },
  { "nested entities (billion laughs)", NULL, "billion-laughs.hlplan", HL_ERR_PARSE, 2,
    { "line 2", "document type declaration", "<!DOCTYPE plan>" }, "haha" },
  { "external entity naming /etc/passwd", NULL, "external-entity.hlplan", HL_ERR_PARSE, 2,
    { "line 2", "document type declaration" }, "root:" },
  { "external DTD on the network", NULL, "external-dtd.hlplan", HL_ERR_PARSE, 2,
    { "line 2", "document type declaration" }, NULL },
  { "parameter entity on the network", NULL, "parameter-entity.hlplan", HL_ERR_PARSE, 2,
    { "line 2", "document type declaration" }, NULL },
  { "XInclude of /etc/passwd", NULL, "xinclude.hlplan", HL_ERR_PARSE, 11,
    { "line 11", "<notes>" }, "root:" },
};

static char *
bad_case_text (const HlBadCase *c, size_t *size)
{
  if (c->text != NULL)
    {
      *size = strlen (c->text);
      return strdup (c->text);
    }
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/%s", HL_FIXTURES_DIR, c->fixture);
  return read_whole_file (path, size);
}

static void
check_refusal (const HlBadCase *c, HlStatus st, const HlError *err, const HlPlan *out,
               const HlPlan *sentinel, const char *name)
{
  ck_assert_msg (st == c->status, "%s: status %s, expected %s (%s)", c->what,
                 hl_status_name (st), hl_status_name (c->status), err->message);
  ck_assert_int_eq (err->status, st);
  ck_assert_msg (out == sentinel, "%s: the output was changed on failure", c->what);
  if (c->line == HL_ANY_LINE)
    ck_assert_msg (err->line > 0, "%s: no line in \"%s\"", c->what, err->message);
  else
    ck_assert_msg (err->line == c->line, "%s: line %d, expected %d (%s)", c->what, err->line,
                   c->line, err->message);
  char prefix[HL_PATH_MAX];
  snprintf (prefix, sizeof prefix, "%s: line %d", name, err->line);
  ck_assert_msg (strncmp (err->message, prefix, strlen (prefix)) == 0,
                 "%s: \"%s\" does not start with \"%s\"", c->what, err->message, prefix);
  for (int i = 0; i < 3 && c->expect[i] != NULL; i++)
    ck_assert_msg (strstr (err->message, c->expect[i]) != NULL,
                   "%s: \"%s\" lacks \"%s\"", c->what, err->message, c->expect[i]);
  if (c->forbid != NULL)
    ck_assert_msg (strstr (err->message, c->forbid) == NULL, "%s: \"%s\" shows \"%s\"",
                   c->what, err->message, c->forbid);
}

START_TEST (test_bad_input)
{
  const HlBadCase *c = &bad_cases[_i];
  size_t size;
  char *text = bad_case_text (c, &size);
  HlPlan sentinel_storage;
  HlPlan *sentinel = &sentinel_storage;
  HlPlan *out = sentinel;
  HlError err;
  hl_error_clear (&err);

  HlStderrCapture cap;
  capture_stderr_begin (&cap);
  HlStatus st = hl_plan_load_buffer (text, size, "bad.hlplan", &out, &err);
  char *noise = capture_stderr_end (&cap);
  check_refusal (c, st, &err, out, sentinel, "bad.hlplan");
  ck_assert_msg (noise[0] == '\0', "%s: printed to stderr: %s", c->what, noise);
  free (noise);

  /* The same through a file: the message names its path. */
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/case.hlplan", dir);
  write_whole_file (path, text, size);
  hl_error_clear (&err);
  st = hl_plan_load_file (path, &out, &err);
  check_refusal (c, st, &err, out, sentinel, path);
  remove_tree (dir);
  free (text);
}
END_TEST

/* A marker or two-point calibration records the magnification its points
 * give: written, read back, and a file that agrees to the shown 3 decimals
 * loads.  The limits 1.0 and 1.5 themselves are accepted. */
START_TEST (test_calibration_records_magnification)
{
  static const char agree[] = XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK
    "  <calibration method=\"marker\" magnification=\"1.3004\" marker-diameter-mm=\"25\">\n"
    "    <point x-mm=\"16.25\" y-mm=\"0\"/>\n    <point x-mm=\"0\" y-mm=\"16.25\"/>\n"
    "    <point x-mm=\"-16.25\" y-mm=\"0\"/>\n  </calibration>\n" PLAN_CLOSE;
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_load_buffer (agree, strlen (agree), "agree", &plan, &err) == HL_OK,
                 "%s", err.message);
  /* radius 16.25 mm over a 25 mm sphere: 1.3 exactly */
  ck_assert_double_eq_tol (plan->calibration.magnification, 1.3, 1e-12);

  /* A typed value left over from before the marker is replaced on save by
   * the marker's own magnification. */
  plan->calibration.magnification = 1.17;
  char *text = NULL;
  size_t size = 0;
  ck_assert_int_eq (hl_plan_to_buffer (plan, &text, &size, &err), HL_OK);
  ck_assert_msg (strstr (text, "magnification=\"1.3\"") != NULL, "%s", text);
  HlPlan *again = NULL;
  ck_assert_msg (hl_plan_load_buffer (text, size, "again", &again, &err) == HL_OK,
                 "%s", err.message);
  free (text);
  hl_plan_free (again);

  /* The limits: two points 100 and 150 mm apart over 100 mm. */
  static const double at_limit[] = { 100.0, 150.0 };
  for (size_t i = 0; i < sizeof at_limit / sizeof at_limit[0]; i++)
    {
      plan->calibration.method = HL_CAL_TWO_POINT;
      plan->calibration.known_distance_mm = 100.0;
      plan->calibration.n_points = 2;
      plan->calibration.points[0] = (HlVec2) { 0.0, 0.0 };
      plan->calibration.points[1] = (HlVec2) { at_limit[i], 0.0 };
      ck_assert_msg (hl_plan_check (plan, &err) == HL_OK, "%g: %s", at_limit[i], err.message);
    }
  hl_plan_free (plan);
}
END_TEST

/* The base document of the table loads, so each refusal above is caused by
 * what the case changes. */
START_TEST (test_bad_input_base_is_good)
{
  static const char base[] = XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK PLAN_CLOSE;
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_load_buffer (base, strlen (base), "base", &plan, &err) == HL_OK,
                 "%s", err.message);
  ck_assert_str_eq (plan->label, "Bad input");
  ck_assert (same_double (plan->landmarks.p[HL_LM_HIP_CENTRE].x, -95.0));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_truncated)
{
  size_t size;
  char *demo = read_whole_file (HL_EXAMPLES_DIR "/demo.hlplan", &size);
  HlError err;

  /* Half the file: a clear message with a line. */
  HlPlan *out = NULL;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_buffer (demo, size / 2, "half.hlplan", &out, &err),
                    HL_ERR_PARSE);
  ck_assert_ptr_null (out);
  ck_assert_int_gt (err.line, 0);
  ck_assert_msg (strstr (err.message, "not well-formed") != NULL, "%s", err.message);

  /* Every shorter prefix is refused with a message, none crashes; the
   * whole document but its final newline still loads. */
  size_t end = strstr (demo, "</plan>") - demo + strlen ("</plan>");
  for (size_t n = 0; n < end; n += HL_TRUNCATION_STEP)
    {
      hl_error_clear (&err);
      HlStatus st = hl_plan_load_buffer (demo, n, "cut.hlplan", &out, &err);
      ck_assert_msg (st == HL_ERR_PARSE, "prefix of %zu bytes: %s", n, hl_status_name (st));
      ck_assert_ptr_null (out);
      ck_assert_msg (err.message[0] != '\0', "prefix of %zu bytes: no message", n);
    }
  ck_assert_int_eq (hl_plan_load_buffer (demo, end, "whole", &out, &err), HL_OK);
  hl_plan_free (out);
  free (demo);
}
END_TEST

START_TEST (test_size_cap)
{
  static const char head[] = XML_DECL PLAN_OPEN CASE_OK LANDMARKS_OK PLAN_CLOSE "<!--";
  static const char tail[] = "-->\n";
  char *dir = make_temp_dir ();
  HlError err;

  /* Exactly at the cap loads; one byte over is refused before parsing. */
  for (int over = 0; over <= 1; over++)
    {
      size_t size = HL_PLAN_MAX_BYTES + (size_t) over;
      char *data = malloc (size);
      ck_assert_ptr_nonnull (data);
      memset (data, 'p', size);
      memcpy (data, head, strlen (head));
      memcpy (data + size - strlen (tail), tail, strlen (tail));
      char path[HL_PATH_MAX];
      snprintf (path, sizeof path, "%s/big-%d.hlplan", dir, over);
      write_whole_file (path, data, size);

      HlPlan *out = NULL;
      hl_error_clear (&err);
      HlStatus st = hl_plan_load_file (path, &out, &err);
      HlPlan *out2 = NULL;
      HlError err2;
      hl_error_clear (&err2);
      HlStatus st2 = hl_plan_load_buffer (data, size, "big", &out2, &err2);
      if (over == 0)
        {
          ck_assert_msg (st == HL_OK, "a file at the cap: %s", err.message);
          ck_assert_msg (st2 == HL_OK, "a buffer at the cap: %s", err2.message);
        }
      else
        {
          ck_assert_int_eq (st, HL_ERR_PARSE);
          ck_assert_ptr_null (out);
          ck_assert_msg (strstr (err.message, path) != NULL && strstr (err.message, "more than"),
                         "%s", err.message);
          ck_assert_int_eq (st2, HL_ERR_PARSE);
          ck_assert_msg (strstr (err2.message, "more than") != NULL, "%s", err2.message);
        }
      hl_plan_free (out);
      hl_plan_free (out2);
      free (data);
    }
  remove_tree (dir);
}
END_TEST

START_TEST (test_garbage_and_empty)
{
  HlRand r = { HL_GARBAGE_SEED };
  unsigned char garbage[HL_GARBAGE_BYTES];
  for (size_t i = 0; i < sizeof garbage; i++)
    garbage[i] = (unsigned char) rand_next (&r);
  HlPlan *out = NULL;
  HlError err;

  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_buffer ((const char *) garbage, sizeof garbage, "noise.bin",
                                         &out, &err), HL_ERR_PARSE);
  ck_assert_ptr_null (out);
  ck_assert_msg (strstr (err.message, "noise.bin: line") != NULL, "%s", err.message);

  /* A valid start, then garbage with NUL bytes. */
  char mixed[sizeof XML_DECL PLAN_OPEN + 64];
  snprintf (mixed, sizeof mixed, "%s", XML_DECL PLAN_OPEN);
  size_t n = strlen (mixed);
  memcpy (mixed + n, garbage, 64);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_buffer (mixed, n + 64, "mixed", &out, &err), HL_ERR_PARSE);
  ck_assert_int_gt (err.line, 0);

  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_buffer ("", 0, "empty.hlplan", &out, &err), HL_ERR_PARSE);
  ck_assert_msg (strstr (err.message, "empty") != NULL, "%s", err.message);

  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/empty.hlplan", dir);
  write_whole_file (path, "", 0);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (path, &out, &err), HL_ERR_PARSE);
  ck_assert_msg (strstr (err.message, "empty") != NULL && strstr (err.message, path) != NULL,
                 "%s", err.message);

  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (dir, &out, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, "folder") != NULL, "%s", err.message);

  snprintf (path, sizeof path, "%s/no-such-plan.hlplan", dir);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (path, &out, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, path) != NULL, "%s", err.message);
  ck_assert_str_eq (err.field, path);
  ck_assert_ptr_null (out);
  remove_tree (dir);
}
END_TEST

/* ---- Atomic saving ------------------------------------------------------ */

static HlPlan *
demo_plan (void)
{
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLES_DIR "/demo.hlplan", &plan, &err), HL_OK);
  return plan;
}

START_TEST (test_save_replaces_and_sets_mode)
{
  static const struct { mode_t umask; mode_t mode; } modes[] = {
    { 022, 0644 }, { 027, 0640 }, { 077, 0600 }, { 0, 0644 },
  };
  HlPlan *plan = demo_plan ();
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/plan.hlplan", dir);
  write_whole_file (path, "old\n", 4);
  HlError err;

  /* A new name gets 0644 less the umask; the first save replaces a 0644
   * file, which keeps its mode (hl-file-write.h). */
  ck_assert_int_eq (chmod (path, 0644), 0);
  for (size_t i = 0; i < sizeof modes / sizeof modes[0]; i++)
    {
      if (i > 0)
        ck_assert_int_eq (unlink (path), 0);
      mode_t old = umask (modes[i].umask);
      hl_error_clear (&err);
      HlStatus st = hl_plan_save_file (plan, path, &err);
      umask (old);
      ck_assert_msg (st == HL_OK, "%s", err.message);
      struct stat sb;
      ck_assert_int_eq (stat (path, &sb), 0);
      ck_assert_msg ((sb.st_mode & 0777) == modes[i].mode, "umask %03o: mode %03o, expected %03o",
                     (unsigned) modes[i].umask, (unsigned) (sb.st_mode & 0777),
                     (unsigned) modes[i].mode);
    }
  HlPlan *back = NULL;
  ck_assert_int_eq (hl_plan_load_file (path, &back, &err), HL_OK);
  char why[256];
  ck_assert_msg (plans_equal (plan, back, why, sizeof why), "%s", why);
  ck_assert_int_eq (count_entries (dir, "."), 2);

  /* A relative path saves in the working folder. */
  char cwd[HL_PATH_MAX];
  ck_assert_ptr_nonnull (getcwd (cwd, sizeof cwd));
  ck_assert_int_eq (chdir (dir), 0);
  ck_assert_int_eq (hl_plan_save_file (plan, "relative.hlplan", &err), HL_OK);
  ck_assert_int_eq (chdir (cwd), 0);
  snprintf (path, sizeof path, "%s/relative.hlplan", dir);
  ck_assert_int_eq (access (path, R_OK), 0);
  ck_assert_int_eq (count_entries (dir, "."), 2);

  hl_plan_free (back);
  hl_plan_free (plan);
  remove_tree (dir);
}
END_TEST

START_TEST (test_save_failures_keep_old_file)
{
  HlPlan *plan = demo_plan ();
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX];
  HlError err;

  /* A folder that does not exist: named in the message, nothing made. */
  snprintf (path, sizeof path, "%s/no-such-dir/plan.hlplan", dir);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_save_file (plan, path, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, "no-such-dir") != NULL, "%s", err.message);
  ck_assert_int_eq (count_entries (dir, "no-such-dir"), 0);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_summary_save_file (plan, path, &err), HL_ERR_IO);

  /* The target is a folder (tests run as root, where a read-only folder
   * would not stop the write): the folder stays, no temporary is left. */
  snprintf (path, sizeof path, "%s/taken.hlplan", dir);
  ck_assert_int_eq (mkdir (path, 0755), 0);
  char inner[HL_PATH_MAX + 16];
  snprintf (inner, sizeof inner, "%s/keep.txt", path);
  write_whole_file (inner, "inside\n", 7);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_save_file (plan, path, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, path) != NULL, "%s", err.message);
  struct stat sb;
  ck_assert_int_eq (stat (path, &sb), 0);
  ck_assert (S_ISDIR (sb.st_mode));
  char *kept = read_whole_file (inner, NULL);
  ck_assert_str_eq (kept, "inside\n");
  free (kept);
  ck_assert_int_eq (count_entries (dir, ".taken"), 0);

  /* A path that names a folder by its trailing slash. */
  snprintf (path, sizeof path, "%s/", dir);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_write_file_atomic (path, "x", 1, &err), HL_ERR_IO);

  /* A file in the way of the folder part. */
  snprintf (path, sizeof path, "%s/file", dir);
  write_whole_file (path, "plain\n", 6);
  snprintf (path, sizeof path, "%s/file/plan.hlplan", dir);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_save_file (plan, path, &err), HL_ERR_IO);
  snprintf (path, sizeof path, "%s/file", dir);
  kept = read_whole_file (path, NULL);
  ck_assert_str_eq (kept, "plain\n");
  free (kept);

  /* Only the two entries made above are in the folder. */
  ck_assert_int_eq (count_entries (dir, "."), 2);
  ck_assert_int_eq (count_entries (dir, ""), 4);
  hl_plan_free (plan);
  remove_tree (dir);
}
END_TEST

/* ---- Locale ------------------------------------------------------------- */

static bool
has_decimal_comma (const char *text)
{
  for (const char *p = text + 1; *p != '\0'; p++)
    if (*p == ',' && p[-1] >= '0' && p[-1] <= '9' && p[1] >= '0' && p[1] <= '9')
      return true;
  return false;
}

START_TEST (test_locale_independent)
{
  HlPlan *in_c = demo_plan ();

  ck_assert_msg (setlocale (LC_ALL, "de_DE.UTF-8") != NULL,
                 "the de_DE.UTF-8 locale is missing: generate it (tests/bootstrap.sh does)");
  ck_assert_msg (localeconv ()->decimal_point[0] == ',',
                 "de_DE.UTF-8 does not use a decimal comma here");

  HlRand r = { HL_ROUND_TRIP_SEED ^ 0xde };
  HlPlan *plan = random_plan (&r);
  snprintf (plan->label, sizeof plan->label, "Locale case");
  snprintf (plan->notes, sizeof plan->notes, "Numbers with a point.");
  for (size_t i = 0; i < plan->n_options; i++)
    snprintf (plan->options[i].name, sizeof plan->options[i].name, "Option %zu", i);
  plan->mass_kg = 72.123456789012345;

  HlError err;
  hl_error_clear (&err);
  char *text = NULL;
  size_t size = 0;
  ck_assert_int_eq (hl_plan_to_buffer (plan, &text, &size, &err), HL_OK);
  ck_assert_msg (!has_decimal_comma (text), "a decimal comma was written:\n%s", text);
  ck_assert_ptr_nonnull (strstr (text, "mass-kg=\"72.123456789"));

  HlPlan *back = load_text (text, size);
  char why[256];
  ck_assert_msg (plans_equal (plan, back, why, sizeof why), "%s", why);
  assert_same_results (plan, back, 0);

  /* A file written under "C" reads the same under German. */
  HlPlan *in_de = demo_plan ();
  ck_assert_msg (plans_equal (in_c, in_de, why, sizeof why), "%s", why);

  char *summary = NULL;
  ck_assert_int_eq (hl_summary_to_buffer (plan, HL_SUMMARY_DATE, &summary, &size, &err), HL_OK);
  ck_assert_msg (!has_decimal_comma (summary), "a decimal comma in the summary");
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/summary.xml", dir);
  write_whole_file (path, summary, size);
  xmllint_validate_one (path);
  remove_tree (dir);

  /* The module switched numbers to "C" for its own thread and back. */
  ck_assert_msg (localeconv ()->decimal_point[0] == ',',
                 "the process locale was changed by the file module");

  free (text);
  free (summary);
  hl_plan_free (plan);
  hl_plan_free (back);
  hl_plan_free (in_c);
  hl_plan_free (in_de);
}
END_TEST

/* ---- Threads ------------------------------------------------------------ */

#define HL_THREAD_ROUNDS 25

typedef struct {
  uint64_t seed;
  const char *locale;     /* the thread's own locale, via uselocale */
  char failure[512];      /* empty when every round passed */
} HlThreadJob;

/* Loads, saves and refuses files while another thread does the same under
 * another locale: error capture and number formatting stay per thread. */
static void *
thread_job (void *data)
{
  HlThreadJob *job = data;
  static const char bad[] = XML_DECL PLAN_OPEN CASE_OK "  <landmarks>\n"
    "    <landmark name=\"hip-centre\" x-mm=\"abc\" y-mm=\"0\"/>\n" LM_MID LM_INS
    "  </landmarks>\n" PLAN_CLOSE;
  locale_t loc = newlocale (LC_ALL_MASK, job->locale, (locale_t) 0);
  if (loc == (locale_t) 0)
    {
      snprintf (job->failure, sizeof job->failure, "locale %s is missing", job->locale);
      return NULL;
    }
  locale_t old = uselocale (loc);
  HlRand r = { job->seed };
  for (int i = 0; i < HL_THREAD_ROUNDS && job->failure[0] == '\0'; i++)
    {
      HlPlan *plan = hl_plan_new ();
      HlError err;
      hl_error_clear (&err);
      hl_plan_set_demo_landmarks (plan);
      plan->mass_kg = rand_uniform (&r, 40.0, 140.0);
      plan->landmarks.p[HL_LM_MIDLINE].y = rand_uniform (&r, -40.0, -25.0);
      char *text = NULL;
      size_t size = 0;
      HlPlan *back = NULL;
      if (hl_plan_to_buffer (plan, &text, &size, &err) != HL_OK
          || hl_plan_load_buffer (text, size, "thread", &back, &err) != HL_OK)
        snprintf (job->failure, sizeof job->failure, "round %d: %.400s", i, err.message);
      else if (!same_double (back->mass_kg, plan->mass_kg)
               || !same_double (back->landmarks.p[HL_LM_MIDLINE].y,
                                plan->landmarks.p[HL_LM_MIDLINE].y))
        snprintf (job->failure, sizeof job->failure, "round %d: values changed", i);
      else if (has_decimal_comma (text))
        snprintf (job->failure, sizeof job->failure, "round %d: a decimal comma", i);

      HlPlan *none = NULL;
      hl_error_clear (&err);
      if (job->failure[0] == '\0'
          && (hl_plan_load_buffer (bad, strlen (bad), "bad", &none, &err) != HL_ERR_PARSE
              || strstr (err.message, "line 5, element <landmark name=\"hip-centre\">: "
                         "attribute x-mm is 'abc'") == NULL))
        snprintf (job->failure, sizeof job->failure, "round %d: wrong refusal: %.400s", i,
                  err.message);
      free (text);
      hl_plan_free (plan);
      hl_plan_free (back);
    }
  uselocale (old);
  freelocale (loc);
  return NULL;
}

START_TEST (test_threads)
{
  HlThreadJob jobs[2] = {
    { HL_ROUND_TRIP_SEED + 1, "de_DE.UTF-8", "" },
    { HL_ROUND_TRIP_SEED + 2, "C", "" },
  };
  pthread_t threads[2];
  for (int i = 0; i < 2; i++)
    ck_assert_int_eq (pthread_create (&threads[i], NULL, thread_job, &jobs[i]), 0);
  for (int i = 0; i < 2; i++)
    ck_assert_int_eq (pthread_join (threads[i], NULL), 0);
  for (int i = 0; i < 2; i++)
    ck_assert_msg (jobs[i].failure[0] == '\0', "thread in %s: %s", jobs[i].locale,
                   jobs[i].failure);
}
END_TEST

/* ---- Suite ------------------------------------------------------------- */

#define N_OF(a) ((int) (sizeof (a) / sizeof (a)[0]))

/* File names: one rule for the extension, the suggested name, canonical
 * paths (g_canonicalize_filename). */
START_TEST (test_paths)
{
  static const struct { const char *name, *ext, *want; } ext_cases[] = {
    { "case", ".pdf", "case.pdf" },
    { "case.pdf", ".pdf", "case.pdf" },
    { "case.PDF", ".pdf", "case.PDF" },          /* any case of the letters */
    { "case.pdf.txt", ".pdf", "case.pdf.txt.pdf" },
    { "/tmp/a.b/plan", ".hlplan", "/tmp/a.b/plan.hlplan" },
    { "pdf", ".pdf", "pdf.pdf" },
  };
  for (size_t i = 0; i < sizeof ext_cases / sizeof ext_cases[0]; i++)
    {
      char *got = hl_path_with_extension (ext_cases[i].name, ext_cases[i].ext);
      ck_assert_str_eq (got, ext_cases[i].want);
      g_free (got);
    }
  char *name = hl_path_suggested_name ("Hip/left: A\\B", "case", "-report.pdf");
  ck_assert_str_eq (name, "Hip-left- A-B-report.pdf");
  g_free (name);
  name = hl_path_suggested_name ("", "case", ".hlplan");
  ck_assert_str_eq (name, "case.hlplan");
  g_free (name);
  char *path = hl_path_canonical ("../b/./c//d.png", "/x/y");
  ck_assert_str_eq (path, "/x/b/c/d.png");
  g_free (path);
}
END_TEST

static Suite *
plan_io_suite (void)
{
  Suite *s = suite_create ("plan-io");
  TCase *tc;

  tc = tcase_create ("round-trip");
  tcase_set_timeout (tc, 600);
  tcase_add_test (tc, test_round_trip_random);
  suite_add_tcase (s, tc);

  tc = tcase_create ("examples");
  tcase_add_loop_test (tc, test_examples_load_and_validate, 0, N_OF (examples));
  tcase_add_loop_test (tc, test_examples_plausible, 0, N_OF (examples));
  tcase_add_test (tc, test_demo_contents);
  tcase_add_test (tc, test_schema_text);
  suite_add_tcase (s, tc);

  tc = tcase_create ("summary");
  tcase_add_loop_test (tc, test_summary_examples, 0, N_OF (examples));
  tcase_add_test (tc, test_summary_refusals);
  tcase_add_test (tc, test_summary_fields_from_table);
  suite_add_tcase (s, tc);

  tc = tcase_create ("write-refusals");
  tcase_add_loop_test (tc, test_write_refusal, 0, N_OF (write_refusals));
  suite_add_tcase (s, tc);

  tc = tcase_create ("bad-input");
  tcase_add_test (tc, test_bad_input_base_is_good);
  tcase_add_test (tc, test_calibration_records_magnification);
  tcase_add_loop_test (tc, test_bad_input, 0, N_OF (bad_cases));
  tcase_add_test (tc, test_truncated);
  tcase_add_test (tc, test_size_cap);
  tcase_add_test (tc, test_garbage_and_empty);
  suite_add_tcase (s, tc);

  tc = tcase_create ("atomic-save");
  tcase_add_test (tc, test_save_replaces_and_sets_mode);
  tcase_add_test (tc, test_save_failures_keep_old_file);
  suite_add_tcase (s, tc);

  tc = tcase_create ("paths");
  tcase_add_test (tc, test_paths);
  suite_add_tcase (s, tc);

  tc = tcase_create ("locale");
  tcase_add_test (tc, test_locale_independent);
  tcase_add_test (tc, test_threads);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  return hl_test_run (plan_io_suite ());
}
