/* hl-template-shape.h: what the drawing and the canvas need of a template.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The geometry of a placed template (hl-template.h) in the form render/
 * draws and ui/ drags: the cup circle and face line, the rotation centre,
 * the stem body outline, the neck and the head, and where the handles of
 * the template sit.  The inverse of a drag (an inclination from a pointer,
 * a seat from a movement along the shaft axis) is computed here too, so
 * neither the drawing nor the window does geometry.
 *
 * The catalogues the drawing uses are a process-wide registry: the
 * bundled demo catalogue is always in it; the window adds the user's
 * catalogues.  A catalogue once registered is never freed (a later one of
 * the same id takes precedence), so a pointer handed out stays valid for
 * the life of the process, also in a background computation.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>
#include "hl-catalogue.h"
#include "hl-plan.h"
#include "hl-template.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- The registry ------------------------------------------------------ */

/* The catalogue of this id (the latest registered), NULL when none.  The
 * demo catalogue (HL_CATALOGUE_DEMO_ID) is always found. */
const HlCatalogue *hl_catalogue_registry_find (const char *id);
/* Registers cat (ownership passes; it is never freed). */
void hl_catalogue_registry_add (HlCatalogue *cat);
/* The registered catalogues, latest of each id, demo first: fills out
 * (room for max) and returns how many there are. */
size_t hl_catalogue_registry_list (const HlCatalogue **out, size_t max);
/* hl_plan_resolve_templates against the registered catalogues: resolves
 * each templated option whose recorded catalogue is registered unchanged;
 * *warnings (may be NULL) gets what the core reports (g_free), or NULL.
 * Returns the number of options left unresolved. */
size_t hl_catalogue_registry_resolve (HlPlan *plan, char **warnings);

/* ---- The shape --------------------------------------------------------- */

#define HL_TEMPLATE_SHAPE_MAX_POINTS 64
/* The inclination handle sits this far beyond the lateral end of the face
 * line, along it (mm): a choice of ours. */
#define HL_TEMPLATE_INCLINATION_HANDLE_MM 8.0

typedef struct {
  bool cup;                    /* the cup can be drawn */
  HlVec2 cup_centre;           /* C */
  double cup_radius_mm;        /* D / 2 */
  HlVec2 rotation_centre;      /* C' */
  HlVec2 face_medial, face_lateral;
  HlVec2 face_normal;          /* out of the cup */
  double dome_start_rad;       /* the dome as an arc in the plan frame */
  double dome_end_rad;         /*   (angles from +x towards +y, start < end) */
  HlVec2 inclination_handle;

  bool stem;                   /* the stem can be drawn */
  HlVec2 body[HL_TEMPLATE_SHAPE_MAX_POINTS];   /* closed polygon */
  size_t n_body;
  HlVec2 stem_origin;          /* R, the stem's handle */
  HlVec2 neck_base;
  HlVec2 head_centre;          /* H */
  double head_radius_mm;       /* of the head family offering the length */
  HlVec2 axis_proximal, axis_distal;   /* the shaft axis along the body */

  char message[640];           /* why something is missing, translated */
} HlTemplateShape;

/* The shape of option `index`'s template on the plan's native landmarks,
 * with cat (NULL: from the registry).  Returns false when the option is
 * not templated or not resolved (message says so). */
bool hl_template_shape (const HlPlan *plan, size_t index,
                        const HlCatalogue *cat, HlTemplateShape *out);

/* ---- Dragging ---------------------------------------------------------- */

/* The inclination (degrees, clamped to the template limits) of a face line
 * from the cup centre towards `pointer` in the pelvic frame of the plan's
 * operated side.  NaN when pointer is at the centre. */
double hl_template_inclination_towards (const HlPlan *plan, HlVec2 centre,
                                        HlVec2 pointer);
/* The seat after a movement from `from` to `to`: seat0 plus the movement's
 * component along the shaft axis (proximal +), clamped to the template
 * limits.  seat0 when there is no axis. */
double hl_template_seat_moved (const HlPlan *plan, double seat0, HlVec2 from,
                               HlVec2 to);
/* Moves the seat by `mm` along the axis (keyboard), clamped. */
double hl_template_seat_step (double seat, double mm);

/* The next (step +1) or previous (-1) cup size of the template's family,
 * or the next stem size; false at the end of the family or when the
 * family is not in cat. */
bool hl_template_step_cup (HlTemplate *tmpl, const HlCatalogue *cat, int step);
bool hl_template_step_stem (HlTemplate *tmpl, const HlCatalogue *cat, int step);

#ifdef __cplusplus
}
#endif
