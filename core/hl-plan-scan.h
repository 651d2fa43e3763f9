/* hl-plan-scan.h: a linear pre-scan of plan-file bytes before XML parsing.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Private to the core (called by hl-plan-io.c).  libxml2 checks an
 * element's attributes for duplicates pair by pair, so its time grows with
 * the square of their number (16,000 attributes on one element, a 140 kB
 * file, take over a second; a million take hours), and its tree costs some
 * hundred bytes per element or attribute (an 8 MB file of tiny elements
 * needs over 200 MB).  This scan counts start tags and attributes in one
 * pass over the bytes, without parsing, and refuses a file over the limits
 * below before libxml2 sees it.  The limits sit far above any plan this
 * program writes (a plan with 100 options has some 700 elements and
 * attributes).  It also counts <option> start tags and refuses the
 * option after HL_PLAN_MAX_OPTIONS (64), naming its line.
 *
 * The scan understands just enough XML to count: comments, processing
 * instructions, CDATA sections and declarations are skipped, quoted
 * attribute values are skipped, and '=' outside quotes inside a start tag
 * counts one attribute.  Anything else is left to the parser.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "hl-types.h"

#define HL_PLAN_SCAN_MAX_ELEMENTS 10000
#define HL_PLAN_SCAN_MAX_ATTRIBUTES 60000           /* in the whole file */
#define HL_PLAN_SCAN_MAX_ELEMENT_ATTRIBUTES 64      /* on one element */

/* True when the bytes are within the limits.  Otherwise fills err (which
 * may be NULL) with HL_ERR_PARSE, the line, the element and a message led
 * by "NAME: line N, element <E>: " as the loader's other messages are. */
bool hl_plan_scan_ok (const char *data, size_t size, const char *name_for_errors,
                      HlError *err);
