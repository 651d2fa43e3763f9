/* hl-catalogue.h: implant catalogues (templating.md section 1).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A catalogue is our own XML format, namespace HL_CATALOGUE_NAMESPACE,
 * schema data/hiplever-implants.xsd (compiled into the core):
 *
 *   <implant-catalogue xmlns="urn:hiplever:implants" id version label>
 *     <cup-family id label>
 *       <cup outer-diameter-mm/>...                one per size
 *       <liner id lateralisation-mm/>...           >= 0, along the face normal
 *     </cup-family>...
 *     <stem-family id label fixation="cementless|cemented">
 *       <version id neck-shaft-angle-deg/>...
 *       <stem size length-mm>
 *         <neck version offset-mm height-mm/>...    exactly one per version
 *         <body level-mm width-mm/>...              two or more
 *       </stem>...
 *     </stem-family>...
 *     <head-family id diameter-mm>
 *       <head length-mm/>...
 *     </head-family>...
 *   </implant-catalogue>
 *
 * Stem geometry, in the stem's own frame (its axis is laid on the femoral
 * shaft axis, hl-template.h): the origin R lies on the axis; `offset-mm` is
 * the head centre's distance (head length 0) perpendicular to the axis,
 * towards the medial side; `height-mm` its distance along the axis,
 * proximal positive, from R.  Body widths are the medial-lateral width of
 * the stem at `level-mm` along the axis from R, proximal positive (so the
 * distal body has negative levels); between listed levels the width is
 * interpolated linearly, outside them there is no body.  `length-mm` is the
 * stem's overall length, for information.  A head's length moves its
 * centre along the neck (hl-template.h); head diameter does not enter the
 * mechanics.
 *
 * Loading is hardened as plan files are: a size cap, a linear pre-scan
 * (element and attribute counts), no DTD, no entities, no network; then the
 * schema and our own checks.  Every error names the element and its line
 * in our words (HlError.field = the element, HlError.line), with distinct
 * messages for a missing size, a non-numeric number, a neck of an unknown
 * version and a duplicate size.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>
#include "hl-plan.h"
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

#define HL_CATALOGUE_NAMESPACE "urn:hiplever:implants"
#define HL_CATALOGUE_MAX_BYTES (4u * 1024u * 1024u)
#define HL_CATALOGUE_LABEL_MAX 128
/* Id of the bundled invented demo catalogue (data/catalogues/demo.hlcat). */
#define HL_CATALOGUE_DEMO_ID "hiplever-demo"
#define HL_CATALOGUE_FILE_EXTENSION ".hlcat"

typedef enum {
  HL_FIXATION_CEMENTLESS = 0,
  HL_FIXATION_CEMENTED,
} HlFixation;

/* Cement mantle on each side of a cemented stem for the size suggestion:
 * 2 mm, common practice. */
#define HL_CEMENT_MANTLE_MM 2.0

typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  double lateralisation_mm;     /* >= 0 */
} HlLiner;

typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  char label[HL_CATALOGUE_LABEL_MAX];
  double *diameters_mm;         /* outer diameters, ascending */
  size_t n_sizes;
  HlLiner *liners;              /* in file order */
  size_t n_liners;
} HlCupFamily;

typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  double neck_shaft_angle_deg;  /* a, 90..170 */
} HlStemVersion;

typedef struct {
  double offset_mm;             /* head centre at head length 0, medial + */
  double height_mm;             /* along the axis from R, proximal + */
} HlNeck;

typedef struct {
  double level_mm;              /* along the axis from R, proximal + */
  double width_mm;              /* medial-lateral, > 0 */
} HlBodyWidth;

typedef struct {
  char size[HL_IMPLANT_ID_MAX]; /* label as in the file: "1", "10", "12.5" */
  double length_mm;
  HlNeck *necks;                /* [n_versions], indexed like the family's versions */
  HlBodyWidth *body;            /* ascending level */
  size_t n_body;
} HlStemSize;

typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  char label[HL_CATALOGUE_LABEL_MAX];
  HlFixation fixation;
  HlStemVersion *versions;      /* in file order */
  size_t n_versions;
  HlStemSize *sizes;            /* in file order (smallest first by convention) */
  size_t n_sizes;
} HlStemFamily;

typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  double diameter_mm;
  double *lengths_mm;           /* ascending */
  size_t n_lengths;
} HlHeadFamily;

typedef struct {
  char id[HL_IMPLANT_ID_MAX];
  char version[HL_IMPLANT_ID_MAX];
  char label[HL_CATALOGUE_LABEL_MAX];
  char sha256[HL_SHA256_HEX_SIZE];   /* of the file's bytes */
  char *path;                   /* file it came from, NULL for the bundled text */
  HlCupFamily *cups;
  size_t n_cups;
  HlStemFamily *stems;
  size_t n_stems;
  HlHeadFamily *heads;
  size_t n_heads;
} HlCatalogue;

/* The schema text (data/hiplever-implants.xsd), compiled in. */
const char *hl_catalogue_schema_text (void);
/* The bundled invented demo catalogue, compiled in (same bytes as the
 * installed data/catalogues/demo.hlcat, so the same SHA-256). */
const char *hl_catalogue_demo_text (size_t *size);

/* Loads and validates; on failure *out is untouched and err names the
 * element and line.  name_for_errors may be NULL. */
HlStatus hl_catalogue_load_file (const char *path, HlCatalogue **out,
                                 HlError *err);
HlStatus hl_catalogue_load_buffer (const char *data, size_t size,
                                   const char *name_for_errors,
                                   HlCatalogue **out, HlError *err);
/* The bundled demo catalogue (never fails but for memory). */
HlStatus hl_catalogue_load_demo (HlCatalogue **out, HlError *err);
void hl_catalogue_free (HlCatalogue *cat);

/* Look-ups: NULL (or -1 / false) when absent. */
const HlCupFamily *hl_catalogue_cup_family (const HlCatalogue *cat, const char *id);
const HlLiner *hl_cup_family_liner (const HlCupFamily *fam, const char *id);
/* Index of the size with this outer diameter (within 1e-6 mm), or -1. */
long hl_cup_family_size_index (const HlCupFamily *fam, double diameter_mm);
const HlStemFamily *hl_catalogue_stem_family (const HlCatalogue *cat, const char *id);
long hl_stem_family_size_index (const HlStemFamily *fam, const char *size);
long hl_stem_family_version_index (const HlStemFamily *fam, const char *version);
/* The neck of size index `size` and version index `version`. */
const HlNeck *hl_stem_family_neck (const HlStemFamily *fam, size_t size,
                                   size_t version);
/* Body width at `level_mm` (linear between listed levels); false outside
 * the body. */
bool hl_stem_body_width (const HlStemSize *stem, double level_mm,
                         double *width_mm);
const HlHeadFamily *hl_catalogue_head_family (const HlCatalogue *cat, const char *id);
/* The distinct head lengths of all head families, ascending, into out
 * (room for max); returns how many there are (may exceed max). */
size_t hl_catalogue_head_lengths (const HlCatalogue *cat, double *out, size_t max);
/* True when some head family offers this length (within 1e-6 mm). */
bool hl_catalogue_has_head_length (const HlCatalogue *cat, double length_mm);

/* The record a plan keeps of this catalogue. */
void hl_catalogue_ref (const HlCatalogue *cat, HlCatalogueRef *ref);

/* ---- A set of catalogues (the bundled one and the user's) -------------- */

typedef struct {
  HlCatalogue **items;
  size_t n;
  size_t capacity;
} HlCatalogueSet;

HlCatalogueSet *hl_catalogue_set_new (void);
void hl_catalogue_set_free (HlCatalogueSet *set);   /* frees the catalogues too */
/* Takes ownership of cat; a catalogue with the same id replaces the older
 * one (the later one wins). */
HlStatus hl_catalogue_set_add (HlCatalogueSet *set, HlCatalogue *cat);
/* The bundled demo catalogue plus each file of paths[0 .. n-1] (the
 * catalogues the window's settings remember).  Files that fail to load are
 * skipped; each failure is appended to *problems (malloc'd, one
 * "FILE:LINE: ELEMENT: MESSAGE" per line; NULL when all loaded; may be
 * NULL to ignore).  Fails only when out of memory. */
HlStatus hl_catalogue_set_load (HlCatalogueSet **out, const char *const *paths,
                                size_t n_paths, char **problems);
const HlCatalogue *hl_catalogue_set_find (const HlCatalogueSet *set,
                                          const char *id);

#ifdef __cplusplus
}
#endif
