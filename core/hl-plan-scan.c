/* hl-plan-scan.c: a linear pre-scan of plan-file bytes (see hl-plan-scan.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-plan.h"
#include "hl-plan-scan.h"

/* Enough of an element name to recognise it in a message. */
#define HL_SCAN_NAME_MAX 40

typedef struct {
  const char *p;
  const char *end;
  int line;
} Scan;

static void
advance_to (Scan *s, const char *to)
{
  for (const char *q = s->p; q < to; q++)
    if (*q == '\n')
      s->line++;
  s->p = to;
}

static bool
looking_at (const Scan *s, const char *text)
{
  size_t n = strlen (text);
  return (size_t) (s->end - s->p) >= n && memcmp (s->p, text, n) == 0;
}

/* Moves past the next `text`, or to the end. */
static void
skip_past (Scan *s, const char *text)
{
  size_t n = strlen (text);
  const char *q = s->p;
  while ((size_t) (s->end - q) >= n)
    {
      const char *hit = memchr (q, text[0], (size_t) (s->end - q) - n + 1);
      if (hit == NULL)
        break;
      if (memcmp (hit, text, n) == 0)
        {
          advance_to (s, hit + n);
          return;
        }
      q = hit + 1;
    }
  advance_to (s, s->end);
}

/* Moves past the '>' that closes a tag, skipping quoted values; returns
 * the number of '=' outside quotes: the attributes of a start tag. */
static long
skip_tag (Scan *s)
{
  long equals = 0;
  char quote = 0;
  for (; s->p < s->end; s->p++)
    {
      char c = *s->p;
      if (c == '\n')
        s->line++;
      else if (quote != 0)
        {
          if (c == quote)
            quote = 0;
        }
      else if (c == '"' || c == '\'')
        quote = c;
      else if (c == '=')
        equals++;
      else if (c == '>')
        {
          s->p++;
          break;
        }
    }
  return equals;
}

static bool
refuse (HlError *err, const char *file, int line, const char *tag, size_t tag_len,
        const char *what)
{
  char element[HL_SCAN_NAME_MAX + 3];
  snprintf (element, sizeof element, "<%.*s>",
            (int) (tag_len < HL_SCAN_NAME_MAX ? tag_len : HL_SCAN_NAME_MAX), tag);
  hl_error_set (err, HL_ERR_PARSE, element, _("%s%sline %d, element %s: %s"),
                file ? file : "", file ? ": " : "", line, element, what);
  if (err != NULL)
    err->line = line;
  return false;
}

bool
hl_plan_scan_ok (const char *data, size_t size, const char *name_for_errors,
                 HlError *err)
{
  Scan s = { data, data + size, 1 };
  long elements = 0, attributes = 0, options = 0;
  char what[HL_ERROR_MESSAGE_MAX / 2];

  while (s.p < s.end)
    {
      const char *lt = memchr (s.p, '<', (size_t) (s.end - s.p));
      if (lt == NULL)
        break;
      advance_to (&s, lt + 1);
      if (looking_at (&s, "!--"))
        skip_past (&s, "-->");
      else if (looking_at (&s, "![CDATA["))
        skip_past (&s, "]]>");
      else if (looking_at (&s, "?"))
        skip_past (&s, "?>");
      else if (looking_at (&s, "!") || looking_at (&s, "/"))
        skip_tag (&s);
      else
        {
          const char *tag = s.p;
          size_t tag_len = 0;
          while (tag + tag_len < s.end && strchr (" \t\r\n/>", tag[tag_len]) == NULL)
            tag_len++;
          int line = s.line;
          long n = skip_tag (&s);

          elements++;
          attributes += n;
          /* <option> or <prefix:option>: counted before any parsing. */
          static const char option_tag[] = "option";
          size_t ol = sizeof option_tag - 1;
          if (tag_len >= ol && memcmp (tag + tag_len - ol, option_tag, ol) == 0
              && (tag_len == ol || tag[tag_len - ol - 1] == ':')
              && ++options > HL_PLAN_MAX_OPTIONS)
            {
              snprintf (what, sizeof what,
                        _("this is option %ld; a plan holds at most %d options"),
                        options, HL_PLAN_MAX_OPTIONS);
              return refuse (err, name_for_errors, line, tag, tag_len, what);
            }
          if (n > HL_PLAN_SCAN_MAX_ELEMENT_ATTRIBUTES)
            {
              snprintf (what, sizeof what,
                        _("the element has %ld attributes, more than the %d a plan "
                          "element may have"), n, HL_PLAN_SCAN_MAX_ELEMENT_ATTRIBUTES);
              return refuse (err, name_for_errors, line, tag, tag_len, what);
            }
          if (elements > HL_PLAN_SCAN_MAX_ELEMENTS)
            {
              snprintf (what, sizeof what,
                        _("the file has more than %d elements, more than a plan "
                          "may have"), HL_PLAN_SCAN_MAX_ELEMENTS);
              return refuse (err, name_for_errors, line, tag, tag_len, what);
            }
          if (attributes > HL_PLAN_SCAN_MAX_ATTRIBUTES)
            {
              snprintf (what, sizeof what,
                        _("the file has more than %d attributes, more than a plan "
                          "may have"), HL_PLAN_SCAN_MAX_ATTRIBUTES);
              return refuse (err, name_for_errors, line, tag, tag_len, what);
            }
        }
    }
  return true;
}
