/* hl-plan.h: the plan, everything a user enters for one hip.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Units: millimetres, kilograms, newtons, degrees at this interface.
 *
 * Plan frame: landmarks are stored in millimetres at true anatomical scale
 * (after magnification correction), x towards the patient's LEFT, y
 * SUPERIOR.  On screen the radiographic convention applies: the patient's
 * right is on the viewer's left, so screen x grows with plan x and screen y
 * with -y.
 *
 * Landmarks are named by role, not by anatomical side: "hip centre" is the
 * operated hip's, "-other" landmarks are the contralateral hip's.  Changing
 * the operated side therefore means mirroring the landmarks (hl_plan_mirror).
 */
#pragma once

#include <stdbool.h>
#include "hl-calibration.h"
#include "hl-image-ref.h"
#include "hl-mc-settings.h"
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

#define HL_LABEL_MAX 128   /* bytes, including the terminating NUL */
#define HL_NAME_MAX  64

/* ---- Landmarks -------------------------------------------------------- */

typedef enum {
  /* needed by the mechanics */
  HL_LM_HIP_CENTRE = 0,        /* centre of rotation of the operated hip */
  HL_LM_MIDLINE,               /* a point on the pelvic midline */
  HL_LM_ABDUCTOR_ORIGIN,       /* optional: without it a set line angle is used */
  HL_LM_ABDUCTOR_INSERTION,    /* on the greater trochanter */
  /* radiographic measures (all optional) */
  HL_LM_TEARDROP,              /* operated side */
  HL_LM_TEARDROP_OTHER,
  HL_LM_LESSER_TROCHANTER,     /* tip, operated side */
  HL_LM_LESSER_TROCHANTER_OTHER,
  HL_LM_SHAFT_PROXIMAL,        /* two points on the operated femoral shaft axis */
  HL_LM_SHAFT_DISTAL,
  HL_LM_SHAFT_PROXIMAL_OTHER,
  HL_LM_SHAFT_DISTAL_OTHER,
  HL_LM_HIP_CENTRE_OTHER,      /* contralateral femoral head centre */
  /* templating aids (all optional; hl-template.h) */
  HL_LM_ILIOISCHIAL_UPPER,     /* two points on the operated ilioischial line */
  HL_LM_ILIOISCHIAL_LOWER,
  HL_LM_ACETABULAR_MARGIN,     /* lateral edge of the operated acetabular roof */
  HL_LM_CANAL_MEDIAL_1,        /* inner (endosteal) canal edges of the operated */
  HL_LM_CANAL_LATERAL_1,       /* femur, medial and lateral, at up to three */
  HL_LM_CANAL_MEDIAL_2,        /* levels (1 proximal ... 3 distal) */
  HL_LM_CANAL_LATERAL_2,
  HL_LM_CANAL_MEDIAL_3,
  HL_LM_CANAL_LATERAL_3,
  HL_LM_COUNT
} HlLandmarkId;

typedef enum {
  HL_SEGMENT_PELVIS,       /* moves with the cup options */
  HL_SEGMENT_FEMUR,        /* moves with the femoral options */
  HL_SEGMENT_OTHER_FEMUR,  /* never moved by an option */
} HlSegment;

typedef struct {
  HlLandmarkId id;
  const char *key;        /* stable file and CLI name: "hip-centre" */
  const char *label;      /* plain words for people: "Hip centre" */
  const char *hint;       /* where to place it, one sentence */
  HlSegment segment;
  bool required;          /* required for a solve */
  bool other_side;        /* belongs to the contralateral hip */
} HlLandmarkInfo;

const HlLandmarkInfo *hl_landmark_info (HlLandmarkId id);
/* Returns HL_LM_COUNT when `key` names no landmark. */
HlLandmarkId hl_landmark_from_key (const char *key);

typedef struct {
  HlVec2 p[HL_LM_COUNT];   /* plan frame, mm */
  uint32_t placed;         /* bit (1u << id) set when p[id] is placed */
} HlLandmarks;

static inline bool
hl_landmarks_has (const HlLandmarks *lm, HlLandmarkId id)
{
  return (lm->placed >> id) & 1u;
}

static inline void
hl_landmarks_set (HlLandmarks *lm, HlLandmarkId id, double x, double y)
{
  lm->p[id].x = x;
  lm->p[id].y = y;
  lm->placed |= 1u << id;
}

static inline void
hl_landmarks_unset (HlLandmarks *lm, HlLandmarkId id)
{
  lm->placed &= ~(1u << id);
}

/* ---- Model choices ---------------------------------------------------- */

/* Stance-limb mass fraction tables; each is named with its source in
 * hl-plan.c. */
typedef enum {
  HL_LIMB_DEMPSTER = 0,        /* 0.161, Dempster 1955 as tabulated by Winter */
  HL_LIMB_PLAGENHOEF_MEN,      /* 0.1668, Plagenhoef et al. 1983 */
  HL_LIMB_PLAGENHOEF_WOMEN,    /* 0.1843 */
  HL_LIMB_DE_LEVA_MEN,         /* 0.1986, de Leva 1996 */
  HL_LIMB_DE_LEVA_WOMEN,       /* 0.2088 */
  HL_LIMB_SIXTH,               /* 1/6, the classroom rule */
  HL_LIMB_CUSTOM,              /* ModelChoices.limb_fraction_custom */
  HL_LIMB_N
} HlLimbTable;

typedef struct {
  HlLimbTable table;
  const char *key;        /* "dempster-winter" */
  const char *label;      /* "Dempster (Winter's table), 0.161" */
  const char *source;     /* full citation */
  double fraction;        /* NaN for HL_LIMB_CUSTOM */
} HlLimbTableInfo;

const HlLimbTableInfo *hl_limb_table_info (HlLimbTable table);
HlLimbTable hl_limb_table_from_key (const char *key); /* HL_LIMB_N if unknown */

/* Where the superincumbent weight acts. */
typedef enum {
  HL_BW_LINE_SEGMENTAL = 0,  /* x_s = x_mid / (1 - f): whole-body CoM on the
                              * midline, stance-limb CoM at the hip centre */
  HL_BW_LINE_MIDLINE,        /* x_s = x_mid, the simplified classroom model */
} HlBwLine;

/* How the abductor line of action is found. */
typedef enum {
  HL_ABDUCTOR_LINE_AUTO = 0,   /* from origin to insertion when the origin is
                                * placed, else the set angle */
  HL_ABDUCTOR_LINE_ANGLE,      /* always the set angle through the insertion */
} HlAbductorLineMode;

typedef struct {
  HlLimbTable limb_table;
  double limb_fraction_custom;   /* used with HL_LIMB_CUSTOM */
  HlBwLine bw_line;
  HlAbductorLineMode abductor_line;
  double abductor_angle_deg;     /* to the horizontal; default 70 */
  double lean_mm;                /* lateral trunk lean towards the stance side */
} HlModelChoices;

/* ---- Aids and loads --------------------------------------------------- */

typedef enum {
  HL_HAND_CONTRALATERAL = 0,   /* the hand on the side opposite the operated hip */
  HL_HAND_IPSILATERAL,         /* the hand on the operated side */
} HlHand;

typedef enum {
  HL_FORCE_UNIT_N = 0,         /* newtons */
  HL_FORCE_UNIT_PERCENT_BW,    /* per cent of body weight */
  HL_FORCE_UNIT_KG,            /* kilograms read off a bathroom scale */
} HlForceUnit;

typedef struct {
  bool enabled;
  HlHand hand;
  HlForceUnit unit;
  double value;                /* in `unit` */
  double distance_mm;          /* horizontal distance of the hand from the midline */
} HlCane;

typedef struct {
  double mass_kg;              /* 0 = none */
  double distance_mm;          /* horizontal distance of the hand from the midline */
} HlHandLoad;

typedef struct {
  HlHandLoad hand[2];          /* indexed by HlHand */
  double midline_kg;           /* a load on the midline, e.g. a backpack */
} HlLoads;

/* ---- Calibration ------------------------------------------------------ */

/* HlCalMethod and HlCalibration are in hl-calibration.h. */

/* ---- Reconstruction options ------------------------------------------ */

/* An option's implants, placed on the radiograph (templating.md section 2;
 * the geometry functions are in hl-template.h, the catalogue in
 * hl-catalogue.h).  File element <template>, a child of <option>, with the
 * attributes named beside each field.
 *
 * Frames and units: plan frame (x to the patient's LEFT, y superior), true
 * mm (after magnification correction), degrees.
 *
 * The ids name entries of the catalogue `catalogue`; they are copied text,
 * so a template outlives the catalogue it was made from.  The catalogue's
 * numbers the geometry needs (the liner's lateralisation, the neck's offset
 * and height for the stem size and version, the version's neck-shaft
 * angle) are copied into the `dims` block by hl_template_resolve(); they
 * are never written to a file.  `resolved` false means "the catalogue was
 * not at hand or has changed since the plan was saved": the option then
 * keeps the four numbers of its HlRecon as last derived (and saved) and
 * nothing is re-derived until the user resolves it again. */
#define HL_IMPLANT_ID_MAX 48   /* bytes of an implant id, with the NUL */

typedef struct {
  double liner_lateralisation_mm;  /* l: face-normal shift of the centre, + out of the cup */
  double neck_offset_mm;           /* head centre at head length 0: perpendicular */
  double neck_height_mm;           /*   to the axis (medial +) and along it (proximal +) */
  double neck_shaft_angle_deg;     /* a of the stem version */
} HlTemplateDims;

typedef struct {
  bool on;                              /* the option is templated */
  char catalogue[HL_IMPLANT_ID_MAX];    /* catalogue= : catalogue id */
  char cup_family[HL_IMPLANT_ID_MAX];   /* cup-family= */
  double cup_diameter_mm;               /* cup-diameter-mm= : outer diameter D */
  double cup_x_mm;                      /* cup-x-mm=, cup-y-mm= : cup centre C, */
  double cup_y_mm;                      /*   plan frame (the hemisphere's centre) */
  double inclination_deg;               /* inclination-deg= : t, face line to the
                                         * inter-teardrop line (else horizontal),
                                         * opening laterally-inferiorly, 0..90 */
  char liner[HL_IMPLANT_ID_MAX];        /* liner= : liner id of the cup family */
  char stem_family[HL_IMPLANT_ID_MAX];  /* stem-family= */
  char stem_size[HL_IMPLANT_ID_MAX];    /* stem-size= : the size's label, e.g. "5" */
  char version[HL_IMPLANT_ID_MAX];      /* version= : stem version id */
  double seat_mm;                       /* seat-mm= : s, stem origin R along the
                                         * shaft axis from T, proximal + */
  double head_length_mm;                /* head-length-mm= : h, along the neck */
  /* Not in the file: from the catalogue (hl_template_resolve). */
  bool resolved;
  HlTemplateDims dims;
} HlTemplate;

/* Signs as model.md section 5: all changes against the native hip.
 *
 * A templated option (tmpl.on) takes its four numbers from its template:
 * hl_model_solve() (hl-solve.h) derives them itself from a resolved
 * template (so no caller can solve stale numbers), with head_length_mm 0
 * (the head is already in H) and neck_shaft_angle_deg the version's angle;
 * the fields below then hold the last derived values (written to the file,
 * used while the template is unresolved, shown by readers that do not
 * solve).  hl_plan_sync_templates() (hl-template.h) refreshes them. */
typedef struct {
  double cup_medial_mm;        /* + medial */
  double cup_superior_mm;      /* + superior */
  double femoral_offset_mm;    /* + lateral */
  double femoral_length_mm;    /* + longer */
  double head_length_mm;       /* + longer neck */
  double neck_shaft_angle_deg; /* for the head length; default 135 */
  HlTemplate tmpl;             /* implants; tmpl.on false for a manual option */
} HlRecon;

/* A catalogue a plan uses, as recorded in the plan file (element
 * <catalogue id version sha256/> in <catalogues>): a catalogue found at
 * open time with the same id but another version or digest is reported
 * (hl_plan_resolve_templates), never silently applied. */
#define HL_PLAN_CATALOGUES_MAX 8
typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  char version[HL_IMPLANT_ID_MAX];
  char sha256[65];             /* 64 lower-case hex digits and the NUL */
} HlCatalogueRef;

#define HL_NECK_SHAFT_ANGLE_DEFAULT 135.0  /* common practice */

typedef struct {
  char name[HL_NAME_MAX];
  HlRecon recon;
} HlOption;

/* ---- Tolerances for the plain-word flags ------------------------------ */

typedef struct {
  /* Global offset reduced by more than this against native or the other
   * hip: Mahmood et al. 2016, Acta Orthop 87:36-41 (5 mm). */
  double global_offset_drop_mm;
  /* Leg length change beyond this: 10 mm, common practice. */
  double leg_length_mm;
  /* Abductor shortening beyond this is flagged as slackening: 5 mm, our
   * default, an assumption to adjust. */
  double abductor_slack_mm;
} HlTolerances;

/* ---- Capacity (model.md section 7) ------------------------------------ */

typedef struct {
  /* Maximal abductor torque per kg of body mass, N m/kg.  Default 1.13
   * (young women, Sugimoto et al. 2014): an assumption, see hl-plan.c. */
  double torque_nm_per_kg;
} HlCapacity;

/* ---- The plan --------------------------------------------------------- */

typedef struct {
  char label[HL_LABEL_MAX];    /* anonymised case label, never an identifier */
  double mass_kg;
  HlSide side;                 /* operated side */
  HlModelChoices model;
  HlLandmarks landmarks;       /* native */
  HlCalibration calibration;
  HlCane cane;
  HlLoads loads;
  HlTolerances tol;
  HlCapacity capacity;
  char notes[1024];            /* free text for the case, no identifiers */
  HlMcSettings uncertainty;    /* Monte Carlo settings (hl-uncertainty.h);
                                * its magnification comes from the calibration */
  HlRadiograph radiograph;     /* the image under the plan (hl-image.h) */
  HlCatalogueRef catalogues[HL_PLAN_CATALOGUES_MAX];  /* the implant catalogues */
  size_t n_catalogues;         /* its templated options use (hl-template.h) */

  /* owned */
  HlOption *options;
  size_t n_options;
  size_t options_capacity;
} HlPlan;

/* A plan with the program defaults and no landmarks or options. */
HlPlan *hl_plan_new (void);
void hl_plan_free (HlPlan *plan);
/* Deep copy; NULL when out of memory. */
HlPlan *hl_plan_copy (const HlPlan *plan);
/* Replaces *dst's contents with a deep copy of src. */
HlStatus hl_plan_assign (HlPlan *dst, const HlPlan *src);
/* The invented demo geometry of model.md section 2, right hip, 72.5 kg. */
void hl_plan_set_demo_landmarks (HlPlan *plan);

void hl_recon_init (HlRecon *recon);  /* all zero, neck-shaft angle default */

/* The most options a plan holds: the loader, the window's Add and
 * Duplicate and hl_plan_check refuse more. */
#define HL_PLAN_MAX_OPTIONS 64

/* Appends a copy of `option` (or an empty one named `name` when option is
 * NULL); returns its index, or -1 when out of memory or when the plan
 * already has HL_PLAN_MAX_OPTIONS options.  Duplicating names the copy
 * "NAME (copy)", "NAME (copy 2)" ... so that names stay unique. */
long hl_plan_add_option (HlPlan *plan, const char *name, const HlRecon *recon);
void hl_plan_remove_option (HlPlan *plan, size_t index);
long hl_plan_duplicate_option (HlPlan *plan, size_t index);
void hl_option_set_name (HlOption *option, const char *name);

/* Mirrors every landmark and calibration point about the plan's x = 0 and
 * swaps the operated side: every result stays the same. */
void hl_plan_mirror (HlPlan *plan);

/* Stance-limb mass fraction in use. */
double hl_plan_limb_fraction (const HlPlan *plan);
/* Body weight in N (mass times standard gravity). */
double hl_plan_body_weight (const HlPlan *plan);
/* The cane's upward force on the body in N (0 when disabled). */
double hl_plan_cane_force (const HlPlan *plan);
/* A plain note when the cane is in the hand on the operated side (the
 * other hand helps the hip more: Neumann 1998, Phys Ther 78:490-501,
 * model.md section 9); NULL otherwise. */
const char *hl_plan_cane_note (const HlPlan *plan);
/* Converts a cane force `value` in `unit` to N for a body mass. */
double hl_force_to_newtons (double value, HlForceUnit unit, double mass_kg);
double hl_force_from_newtons (double newtons, HlForceUnit unit, double mass_kg);

/* Range checks on everything but geometry: finite numbers, mass 20-350 kg,
 * cane force 0..body weight, distances >= 0, option parameters in range.
 * Every field is checked whether or not it is in use (a magnification
 * stored beside a marker calibration, a switched-off cane).  Also: at most
 * HL_PLAN_MAX_OPTIONS options, no two with the same name, and no line
 * break, control or bidirectional control character in the case label or
 * an option name (hl-text.h). */
HlStatus hl_plan_check (const HlPlan *plan, HlError *err);

/* Cup inclination limits a template accepts, degrees. */
#define HL_TEMPLATE_INCLINATION_MIN_DEG 0.0
#define HL_TEMPLATE_INCLINATION_MAX_DEG 90.0
/* |seat| and |head length| limits, mm (sanity limits of ours). */
#define HL_TEMPLATE_SEAT_MAX_MM 150.0
#define HL_TEMPLATE_HEAD_MAX_MM 30.0
/* Range checks of a template (inclination, finite numbers, seat, head
 * length, non-empty ids); the field names the option. */
HlStatus hl_template_check (const HlTemplate *tmpl, const char *option_name,
                            HlError *err);

/* Range of every option parameter, mm (and the angle in degrees). */
#define HL_RECON_LINEAR_MAX_MM 50.0
#define HL_NECK_SHAFT_MIN_DEG  90.0
#define HL_NECK_SHAFT_MAX_DEG  170.0
#define HL_MASS_MIN_KG 20.0
#define HL_MASS_MAX_KG 350.0
#define HL_HAND_LOAD_MAX_KG 100.0    /* a sanity limit of our own */
#define HL_DISTANCE_MAX_MM 1000.0    /* hand distances, a sanity limit */
#define HL_LEAN_MIN_MM (-100.0)
#define HL_LEAN_MAX_MM 200.0
/* HL_COORD_MAX_MM (|landmark coordinate| limit) is in hl-types.h. */

/* Standard gravity, m/s^2. */
#define HL_GRAVITY 9.80665

#ifdef __cplusplus
}
#endif
