/* hl-types.h: shared value types, status codes and error details of the core.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* A point or vector in millimetres (or a force in newtons). */
typedef struct {
  double x;
  double y;
} HlVec2;

/* Every fallible core function returns one of these.  A detail struct
 * (HlError) says which field is at fault and why, in plain words. */
typedef enum {
  HL_OK = 0,
  HL_ERR_INVALID,        /* a number out of range, non-finite, or missing */
  HL_ERR_DEGENERATE,     /* the geometry cannot be solved */
  HL_ERR_NOMEM,          /* out of memory */
  HL_ERR_NOT_CONVERGED,  /* an iterative method did not meet its tolerance */
  HL_ERR_NOT_REACHABLE,  /* no root of an inverse question in its range */
  HL_ERR_IO,             /* a file could not be read or written */
  HL_ERR_PARSE,          /* a file is not a well-formed, valid plan */
  HL_ERR_VERSION,        /* a file is newer than this program understands */
} HlStatus;

#define HL_ERROR_FIELD_MAX   192   /* room for "option "NAME": landmark KEY" */
#define HL_ERROR_MESSAGE_MAX 512

/* Where and why something failed.  `field` names the landmark, parameter or
 * XML element ("landmark abductor-insertion", "patient mass"); `line` is the
 * 1-based line in a file, 0 when there is no file. */
typedef struct {
  HlStatus status;
  int line;
  char field[HL_ERROR_FIELD_MAX];
  char message[HL_ERROR_MESSAGE_MAX];
} HlError;

/* Fills `err` (which may be NULL) and returns `status`. */
HlStatus hl_error_set (HlError *err, HlStatus status, const char *field,
                       const char *fmt, ...)
  __attribute__ ((format (printf, 4, 5)));
void hl_error_clear (HlError *err);
const char *hl_status_name (HlStatus status);

/* SHA-256 digests (GLib's GChecksum): 64 lower-case hex digits and a NUL. */
#define HL_SHA256_HEX_SIZE 65
/* The digest of `size` bytes as hex; returns hex. */
char *hl_sha256_hex (const void *data, size_t size, char hex[HL_SHA256_HEX_SIZE]);

/* The one number formatter of every output (tables, CSV, plan files,
 * summaries), always with a point whatever the locale (GLib's
 * g_ascii_formatd):
 *  - decimals >= 0: that many after the point, "-0.000" written "0.000"
 *    (a sign that is not there), "nan" for a value that is not finite;
 *  - decimals == HL_NUMBER_EXACT: the shortest text that reads back as the
 *    same double (15 to 17 significant digits), "NaN", "INF", "-INF" for
 *    the values that are not finite (xs:double's spelling);
 *  - decimals == HL_NUMBER_SIGNIFICANT (n): n significant digits as "%.ng"
 *    writes them (1 <= n <= 17), "nan" for a value that is not finite.
 * Returns buf (size >= HL_NUMBER_TEXT_SIZE is always enough). */
#define HL_NUMBER_TEXT_SIZE 64
#define HL_NUMBER_EXACT (-1)
#define HL_NUMBER_SIGNIFICANT(n) (-100 - (n))
char *hl_format_number (char *buf, size_t size, int decimals, double value);

/* The operated side. */
typedef enum {
  HL_SIDE_RIGHT = 0,
  HL_SIDE_LEFT = 1,
} HlSide;

const char *hl_side_name (HlSide side);   /* "right", "left" */

/* Mean AP pelvis magnification 119.8% (range 117-123.4%): Brew et al. 2012,
 * J Arthroplasty 27:643-647. */
#define HL_MAGNIFICATION_ASSUMED 1.20
/* The magnification accepted from any calibration source (typed, marker,
 * two points, or the image file).  A projection radiograph is always
 * magnified (M >= 1: the film or detector lies behind the patient); 1.5
 * lies far beyond the published range of AP pelvis films (117-123.4%,
 * Brew et al. 2012, above).  The bounds are common practice. */
#define HL_MAGNIFICATION_MIN 1.0
#define HL_MAGNIFICATION_MAX 1.5
#define HL_COORD_MAX_MM 2000.0       /* |landmark coordinate| limit */

/* Decimals of the numbers people read (the window, the command line's text
 * output, the report): the digits that mean something for a static
 * estimate from landmarks placed to about a millimetre.  Machine outputs
 * keep their own contract (CSV 3 decimals, 4 for the lever ratio; XML
 * full precision). */
#define HL_DECIMALS_N 0               /* forces in N */
#define HL_DECIMALS_BW 2              /* forces in multiples of body weight */
#define HL_DECIMALS_MM 1              /* lengths and their changes */
#define HL_DECIMALS_DEG 1             /* angles */
#define HL_DECIMALS_RATIO 2           /* the lever ratio, demand over capacity */
#define HL_DECIMALS_MAGNIFICATION 3   /* a radiograph's magnification */

#ifdef __cplusplus
}
#endif
