/* hl-types.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include <math.h>

#include <glib.h>

#include "hl-text.h"
#include "hl-types.h"

#define ROUND_TRIP_DIGITS_MIN 15   /* the shortest first, DBL_DECIMAL_DIG last */
#define ROUND_TRIP_DIGITS_MAX 17

char *
hl_format_number (char *buf, size_t size, int decimals, double value)
{
  char format[16];

  if (decimals == HL_NUMBER_EXACT)
    {
      if (isnan (value))
        snprintf (buf, size, "%s", "NaN");
      else if (isinf (value))
        snprintf (buf, size, "%s", value > 0 ? "INF" : "-INF");
      else
        for (int digits = ROUND_TRIP_DIGITS_MIN; digits <= ROUND_TRIP_DIGITS_MAX; digits++)
          {
            snprintf (format, sizeof format, "%%.%dg", digits);
            g_ascii_formatd (buf, (gint) size, format, value);
            if (g_ascii_strtod (buf, NULL) == value)
              break;
          }
      return buf;
    }
  if (!isfinite (value))
    {
      snprintf (buf, size, "%s", "nan");
      return buf;
    }
  if (decimals <= HL_NUMBER_SIGNIFICANT (1))
    {
      int digits = -100 - decimals;
      snprintf (format, sizeof format, "%%.%dg", digits > 17 ? 17 : digits);
      g_ascii_formatd (buf, (gint) size, format, value);
      return buf;
    }
  snprintf (format, sizeof format, "%%.%df", decimals < 0 ? 0 : decimals > 17 ? 17 : decimals);
  g_ascii_formatd (buf, (gint) size, format, value);
  if (buf[0] == '-' && strspn (buf + 1, "0.") == strlen (buf + 1))
    memmove (buf, buf + 1, strlen (buf));
  return buf;
}

char *
hl_sha256_hex (const void *data, size_t size, char hex[HL_SHA256_HEX_SIZE])
{
  gchar *digest = g_compute_checksum_for_data (G_CHECKSUM_SHA256, data, size);
  snprintf (hex, HL_SHA256_HEX_SIZE, "%s", digest);
  g_free (digest);
  return hex;
}

HlStatus
hl_error_set (HlError *err, HlStatus status, const char *field,
              const char *fmt, ...)
{
  if (err == NULL)
    return status;

  err->status = status;
  snprintf (err->field, sizeof err->field, "%s", field ? field : "");

  va_list ap;
  va_start (ap, fmt);
  int n = vsnprintf (err->message, sizeof err->message, fmt, ap);
  va_end (ap);
  /* A message cut short ends on a whole character. */
  if (n >= (int) sizeof err->message)
    hl_utf8_trim_end (err->message);
  if (strlen (field ? field : "") >= sizeof err->field)
    hl_utf8_trim_end (err->field);

  return status;
}

void
hl_error_clear (HlError *err)
{
  if (err != NULL)
    memset (err, 0, sizeof *err);
}

const char *
hl_status_name (HlStatus status)
{
  switch (status)
    {
    case HL_OK: return "ok";
    case HL_ERR_INVALID: return "invalid input";
    case HL_ERR_DEGENERATE: return "degenerate geometry";
    case HL_ERR_NOMEM: return "out of memory";
    case HL_ERR_NOT_CONVERGED: return "not converged";
    case HL_ERR_NOT_REACHABLE: return "not reachable in range";
    case HL_ERR_IO: return "input/output error";
    case HL_ERR_PARSE: return "not a valid plan file";
    case HL_ERR_VERSION: return "file version too new";
    default: return "unknown status";
    }
}

const char *
hl_side_name (HlSide side)
{
  return side == HL_SIDE_LEFT ? "left" : "right";
}
