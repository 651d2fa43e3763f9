/* hl-xml-load.c: the hardened XML load shared by plans and catalogues.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <inttypes.h>
#include <limits.h>
#include <pthread.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <libxml/SAX2.h>

#include "hl-i18n.h"
#include "hl-plan-scan.h"
#include "hl-text.h"
#include "hl-xml-load.h"

/* Flags of every parse: no network, line numbers past 65535. */
#define HL_XML_PARSE_OPTIONS (XML_PARSE_NONET | XML_PARSE_BIG_LINES)

int
hl_xml_node_line (xmlNodePtr node)
{
  long line = node ? xmlGetLineNo (node) : 0;
  return line > 0 && line < INT_MAX ? (int) line : 0;
}

HlStatus
hl_xml_fail_at (HlXmlLoad *l, HlStatus status, int line, const char *element,
                const char *fmt, ...)
{
  if (l->status != HL_OK)
    return l->status;
  l->status = status;

  char what[HL_ERROR_MESSAGE_MAX];
  va_list ap;
  va_start (ap, fmt);
  vsnprintf (what, sizeof what, fmt, ap);
  va_end (ap);

  char where[HL_ERROR_MESSAGE_MAX / 2];
  size_t n = 0;
  where[0] = '\0';
  if (l->name != NULL)
    n += (size_t) snprintf (where + n, sizeof where - n, "%s: ", l->name);
  if (line > 0 && n < sizeof where)
    n += (size_t) snprintf (where + n, sizeof where - n, _("line %d, "), line);
  if (element != NULL && element[0] != '\0' && n < sizeof where)
    n += (size_t) snprintf (where + n, sizeof where - n, _("element %s: "), element);
  if (n >= 2 && n < sizeof where && where[n - 2] == ',')
    {
      where[n - 2] = ':';
      where[n - 1] = ' ';
    }

  if (l->err != NULL)
    {
      hl_error_set (l->err, status, element ? element : "", "%s%s", where, what);
      l->err->line = line;
    }
  return status;
}

/* libxml2 writes "{urn:hiplever:plan}landmark"; people read "landmark". */
static void
clean_xml_message (char *msg, const char *ns)
{
  if (ns != NULL && ns[0] != '\0')
    {
      char braced[256];
      int n = snprintf (braced, sizeof braced, "{%s}", ns);
      char *p;
      while (n > 0 && (size_t) n < sizeof braced && (p = strstr (msg, braced)) != NULL)
        memmove (p, p + n, strlen (p + n) + 1);
    }
  size_t len = strlen (msg);
  while (len > 0 && (msg[len - 1] == '\n' || msg[len - 1] == ' '))
    msg[--len] = '\0';
}

/* libxml2's parser messages in our words (they otherwise leak its own
 * terms, "use XML_PARSE_HUGE option" among them).  The line and the
 * element are added by the caller. */
static const char *
parser_message (const xmlError *e, char *buf, size_t size)
{
  switch (e->code)
    {
    case XML_ERR_DOCUMENT_EMPTY:
    case XML_ERR_DOCUMENT_START:
      return _("there is no XML element in it: the first '<' is missing");
    case XML_ERR_DOCUMENT_END:
    case XML_ERR_EXTRA_CONTENT:
      return _("there is more after the end of the root element");
    case XML_ERR_INVALID_HEX_CHARREF:
    case XML_ERR_INVALID_DEC_CHARREF:
    case XML_ERR_INVALID_CHARREF:
    case XML_ERR_CHARREF_AT_EOF:
    case XML_ERR_CHARREF_IN_PROLOG:
    case XML_ERR_CHARREF_IN_EPILOG:
      return _("a character reference (&#...;) is malformed or names a character "
               "XML does not allow");
    case XML_ERR_UNKNOWN_ENCODING:
    case XML_ERR_UNSUPPORTED_ENCODING:
      if (e->str1 != NULL && e->str1[0] != '\0')
        {
          char name[HL_XML_QUOTED_MAX];
          snprintf (buf, size, _("the XML declaration names the encoding '%s', which "
                                 "is not read; these files are UTF-8 encoded "
                                 "(encoding=\"UTF-8\")"),
                    hl_text_quote (e->str1, HL_XML_QUOTED_MAX - 1, name, sizeof name));
          return buf;
        }
      /* fall through */
    case XML_ERR_ENCODING_NAME:
    case XML_ERR_MISSING_ENCODING:
      return _("the XML declaration's encoding is malformed or not one that is read; "
               "these files are UTF-8 encoded (encoding=\"UTF-8\")");
    case XML_ERR_INVALID_CHAR:
    case XML_ERR_INVALID_ENCODING:
      return _("the bytes here are not valid UTF-8 text, or a character XML does "
               "not allow; these files are UTF-8 encoded");
    case XML_ERR_ENTITYREF_AT_EOF:
    case XML_ERR_ENTITYREF_IN_PROLOG:
    case XML_ERR_ENTITYREF_IN_EPILOG:
    case XML_ERR_ENTITYREF_NO_NAME:
    case XML_ERR_ENTITYREF_SEMICOL_MISSING:
    case XML_ERR_UNDECLARED_ENTITY:
    case XML_WAR_UNDECLARED_ENTITY:
    case XML_ERR_UNPARSED_ENTITY:
    case XML_ERR_ENTITY_IS_EXTERNAL:
    case XML_ERR_ENTITY_IS_PARAMETER:
    case XML_ERR_ENTITY_LOOP:
    case XML_ERR_ENTITY_BOUNDARY:
    case XML_ERR_ENTITY_PROCESSING:
    case XML_ERR_PEREF_AT_EOF:
    case XML_ERR_PEREF_IN_PROLOG:
    case XML_ERR_PEREF_IN_EPILOG:
    case XML_ERR_PEREF_IN_INT_SUBSET:
    case XML_ERR_PEREF_NO_NAME:
    case XML_ERR_PEREF_SEMICOL_MISSING:
      if (e->str1 != NULL)
        {
          char q[HL_XML_QUOTED_MAX + 1];
          snprintf (buf, size, _("the entity '&%s;' is not one these files can have: only "
                                 "&amp; &lt; &gt; &quot; &apos; and character "
                                 "references are read; write '&' as &amp;"),
                    hl_text_quote (e->str1, HL_XML_QUOTED_MAX, q, sizeof q));
          return buf;
        }
      return _("an '&' starts an entity that these files cannot have: only &amp; &lt; "
               "&gt; &quot; &apos; and character references are read; write '&' "
               "as &amp;");
    case XML_ERR_LT_IN_ATTRIBUTE:
      return _("an attribute value holds '<': write it as &lt;");
    case XML_ERR_ATTRIBUTE_NOT_STARTED:
    case XML_ERR_ATTRIBUTE_WITHOUT_VALUE:
    case XML_ERR_STRING_NOT_STARTED:
    case XML_ERR_VALUE_REQUIRED:
      return _("an attribute has no value in quotes (name=\"value\")");
    case XML_ERR_ATTRIBUTE_NOT_FINISHED:
    case XML_ERR_STRING_NOT_CLOSED:
    case XML_ERR_LITERAL_NOT_FINISHED:
      return _("an attribute value is not closed by its quote, or is too long");
    case XML_ERR_ATTRIBUTE_REDEFINED:
    case XML_NS_ERR_ATTRIBUTE_REDEFINED:
      return _("an attribute appears twice in one element");
    case XML_ERR_COMMENT_NOT_FINISHED:
    case XML_ERR_HYPHEN_IN_COMMENT:
      return _("a comment is not closed by '-->', or holds '--'");
    case XML_ERR_PI_NOT_STARTED:
    case XML_ERR_PI_NOT_FINISHED:
    case XML_ERR_XMLDECL_NOT_STARTED:
    case XML_ERR_XMLDECL_NOT_FINISHED:
    case XML_ERR_RESERVED_XML_NAME:
    case XML_ERR_VERSION_MISSING:
    case XML_ERR_UNKNOWN_VERSION:
    case XML_ERR_STANDALONE_VALUE:
      return _("the XML declaration or a processing instruction (<?...?>) is "
               "malformed or misplaced");
    case XML_ERR_CDATA_NOT_FINISHED:
    case XML_ERR_MISPLACED_CDATA_END:
      return _("a CDATA section is not closed by ']]>', is too long, or ']]>' "
               "stands in text");
    case XML_ERR_DOCTYPE_NOT_FINISHED:
    case XML_ERR_EXT_SUBSET_NOT_FINISHED:
    case XML_ERR_CONDSEC_NOT_STARTED:
    case XML_ERR_CONDSEC_NOT_FINISHED:
    case XML_ERR_CONDSEC_INVALID:
    case XML_ERR_CONDSEC_INVALID_KEYWORD:
      return _("a document type declaration is malformed; these files never have one");
    case XML_ERR_NAME_REQUIRED:
    case XML_ERR_NMTOKEN_REQUIRED:
    case XML_ERR_LT_REQUIRED:
      return _("a '<' is not followed by an element name");
    case XML_ERR_NAME_TOO_LONG:
      return _("an element or attribute name is too long");
    case XML_ERR_GT_REQUIRED:
    case XML_ERR_TAG_NOT_FINISHED:
    case XML_ERR_LTSLASH_REQUIRED:
      return _("an element is not closed: the file ends, or a '>' or its end tag "
               "is missing");
    case XML_ERR_SPACE_REQUIRED:
    case XML_ERR_SEPARATOR_REQUIRED:
    case XML_ERR_EQUAL_REQUIRED:
      return _("the attributes of an element are malformed: a space or '=' is "
               "missing");
    case XML_ERR_TAG_NAME_MISMATCH:
    case XML_ERR_NOT_WELL_BALANCED:
      return _("an end tag does not match the element it closes");
    case XML_NS_ERR_UNDEFINED_NAMESPACE:
    case XML_NS_ERR_QNAME:
    case XML_NS_ERR_EMPTY:
    case XML_NS_ERR_COLON:
    case XML_ERR_NS_DECL_ERROR:
      return _("a name uses a namespace prefix that is not declared, or is malformed");
    case XML_ERR_NO_MEMORY:
      return _("out of memory, or a text too long for these files");
    case XML_ERR_USER_STOP:
      return _("reading was stopped");
    case XML_ERR_INTERNAL_ERROR:
    default:
      return _("the file is nested too deeply, too long in one place, or broken "
               "in a way these files never are");
    }
}

/* A name from libxml2 (an attribute, an element list) without its
 * "{namespace}" parts: "{urn:hiplever:plan}notes" is read "notes". */
static void
strip_namespaces (char *s)
{
  static const char xml_ns[] = "{http://www.w3.org/XML/1998/namespace}";
  char *open;
  /* xml:lang, xml:space keep their prefix */
  while ((open = strstr (s, xml_ns)) != NULL)
    {
      memcpy (open, "xml:", 4);
      memmove (open + 4, open + sizeof xml_ns - 1, strlen (open + sizeof xml_ns - 1) + 1);
    }
  while ((open = strchr (s, '{')) != NULL)
    {
      char *close = strchr (open, '}');
      if (close == NULL)
        break;
      memmove (open, close + 1, strlen (close + 1) + 1);
    }
}

/* The elements libxml2 lists after "Expected is ( ... )", without the
 * namespaces, into buf; false when the message has none. */
static bool
expected_list (const char *message, char *buf, size_t size)
{
  const char *p = message != NULL ? strstr (message, "Expected is ") : NULL;
  const char *open = p != NULL ? strchr (p, '(') : NULL;
  const char *close = open != NULL ? strrchr (open, ')') : NULL;
  if (close == NULL)
    return false;
  open++;
  while (open < close && *open == ' ')
    open++;
  while (close > open && close[-1] == ' ')
    close--;
  char *names = g_strndup (open, (gsize) (close - open));
  strip_namespaces (names);
  snprintf (buf, size, "%s", names);
  g_free (names);
  return buf[0] != '\0';
}

/* The schema validator's messages in our words (libxml2's wording, "This
 * element is not expected. Expected is ( ... )", "identity-constraint",
 * "nillable", is never shown): what is wrong, with the attribute and the
 * value at fault; the caller adds the line and the element. */
static const char *
schema_message (const xmlError *e, const char *no_match, char *buf, size_t size)
{
  char name[HL_XML_QUOTED_MAX];
  char value[HL_XML_QUOTED_MAX];
  char list[HL_ERROR_MESSAGE_MAX / 2];
  snprintf (list, sizeof list, "%s", e->str1 != NULL ? e->str1 : "");
  strip_namespaces (list);
  hl_text_quote (list, HL_XML_QUOTED_MAX - 1, name, sizeof name);
  hl_text_quote (e->str1 != NULL ? e->str1 : "", HL_XML_QUOTED_MAX - 1, value,
                 sizeof value);
  switch (e->code)
    {
    case XML_SCHEMAV_ELEMENT_CONTENT:
    case XML_SCHEMAV_CVC_COMPLEX_TYPE_2_4:
      {
        bool missing = e->message != NULL && strstr (e->message, "Missing child") != NULL;
        if (!expected_list (e->message, list, sizeof list))
          return missing ? _("an element that belongs here is missing")
                         : _("this element does not belong here");
        snprintf (buf, size,
                  missing ? _("an element that belongs here is missing; expected: %s")
                          : _("this element does not belong here; expected here: %s"),
                  list);
        return buf;
      }
    case XML_SCHEMAV_CVC_COMPLEX_TYPE_3_2_1:
    case XML_SCHEMAV_CVC_COMPLEX_TYPE_3_2_2:
    case XML_SCHEMAV_CVC_TYPE_3_1_1:
    case XML_SCHEMAV_ATTRUNKNOWN:
      snprintf (buf, size, _("the attribute %s is not one this element can have"), name);
      return buf;
    case XML_SCHEMAV_CVC_COMPLEX_TYPE_4:
      snprintf (buf, size, _("the attribute %s is missing; this element needs it"), name);
      return buf;
    case XML_SCHEMAV_CVC_COMPLEX_TYPE_2_1:
      return _("this element must be empty");
    case XML_SCHEMAV_CVC_COMPLEX_TYPE_2_3:
      return _("this element holds text, where only elements belong");
    case XML_SCHEMAV_CVC_DATATYPE_VALID_1_2_1:
    case XML_SCHEMAV_CVC_DATATYPE_VALID_1_2_2:
    case XML_SCHEMAV_CVC_DATATYPE_VALID_1_2_3:
      snprintf (buf, size, _("the value '%s' is not of the kind this attribute takes "
                             "(a number, a whole number, true or false, or a name)"),
                value);
      return buf;
    case XML_SCHEMAV_CVC_ENUMERATION_VALID:
      snprintf (list, sizeof list, "%s", e->str2 != NULL ? e->str2 : "");
      snprintf (buf, size, _("the value '%s' is not one of %s"), value, list);
      return buf;
    case XML_SCHEMAV_CVC_MININCLUSIVE_VALID:
    case XML_SCHEMAV_CVC_MINEXCLUSIVE_VALID:
      snprintf (buf, size, _("the value '%s' is below the smallest allowed, %s"), value,
                e->str2 != NULL ? e->str2 : "");
      return buf;
    case XML_SCHEMAV_CVC_MAXINCLUSIVE_VALID:
    case XML_SCHEMAV_CVC_MAXEXCLUSIVE_VALID:
      snprintf (buf, size, _("the value '%s' is above the largest allowed, %s"), value,
                e->str2 != NULL ? e->str2 : "");
      return buf;
    case XML_SCHEMAV_CVC_LENGTH_VALID:
    case XML_SCHEMAV_CVC_MINLENGTH_VALID:
    case XML_SCHEMAV_CVC_MAXLENGTH_VALID:
    case XML_SCHEMAV_CVC_TOTALDIGITS_VALID:
    case XML_SCHEMAV_CVC_FRACTIONDIGITS_VALID:
      snprintf (buf, size, _("the value '%s' is too long or too short here"), value);
      return buf;
    case XML_SCHEMAV_CVC_PATTERN_VALID:
      snprintf (buf, size, _("the value '%s' is not written in the form this attribute "
                             "takes"), value);
      return buf;
    case XML_SCHEMAV_CVC_IDC:
      /* libxml2 gives the repeated value as "['hip-centre']" */
      if (e->str1 != NULL && strncmp (e->str1, "Duplicate", 9) != 0)
        {
          snprintf (list, sizeof list, "%s", e->str1);
          size_t n = strlen (list);
          if (n >= 2 && list[0] == '[' && list[n - 1] == ']')
            {
              list[n - 1] = '\0';
              hl_text_quote (list + 1, HL_XML_QUOTED_MAX - 1, value, sizeof value);
              snprintf (buf, size, _("the name %s is used twice; each must be unique "
                                     "here"), value);
              return buf;
            }
        }
      return _("a name that must be unique here is used twice");
    default:
      return _(no_match);
    }
}

static void
xml_error_cb (void *data, xmlErrorPtr e)
{
  HlXmlLoad *l = data;
  if (l == NULL || e == NULL || e->level < XML_ERR_ERROR || l->xml_error)
    return;
  l->xml_error = true;
  l->xml_line = e->line;
  l->xml_node = NULL;
  l->xml_element[0] = '\0';
  if (e->node != NULL)
    {
      xmlNodePtr node = e->node;
      if (node->type == XML_ATTRIBUTE_NODE)
        node = node->parent;
      if (node != NULL && node->type == XML_ELEMENT_NODE)
        {
          l->xml_node = node;
          if (l->xml_line <= 0)
            l->xml_line = hl_xml_node_line (node);
        }
    }
  else if (l->ctxt != NULL && l->ctxt->name != NULL)
    {
      char q[HL_XML_QUOTED_MAX];
      snprintf (l->xml_element, sizeof l->xml_element, "<%s>",
                hl_text_quote ((const char *) l->ctxt->name, HL_XML_QUOTED_MAX - 3,
                               q, sizeof q));
    }
  /* The parser's and the schema's messages in our words. */
  bool schema = (e->domain == XML_FROM_SCHEMASV || e->domain == XML_FROM_SCHEMASP)
                && e->code != XML_ERR_NO_MEMORY;
  char buf[HL_ERROR_MESSAGE_MAX];
  snprintf (l->xml_message, sizeof l->xml_message, "%s",
            !schema ? parser_message (e, buf, sizeof buf)
            : schema_message (e, l->kind->no_match, buf, sizeof buf));
  clean_xml_message (l->xml_message, l->kind->ns);
}

/* The parser hands its own context to this handler. */
static void
parser_error_cb (void *ctx, xmlErrorPtr e)
{
  xmlParserCtxtPtr ctxt = ctx;
  xml_error_cb (ctxt ? ctxt->_private : NULL, e);
  /* The first fatal error decides; scanning on costs seconds on a flood. */
  if (ctxt != NULL && e != NULL && e->level >= XML_ERR_FATAL)
    xmlStopParser (ctxt);
}

/* Our files never have a DTD: stop at the DOCTYPE, before its internal
 * subset or any external subset is looked at. */
static void
doctype_cb (void *ctx, const xmlChar *name, const xmlChar *external_id,
            const xmlChar *system_id)
{
  (void) external_id;
  (void) system_id;
  xmlParserCtxtPtr ctxt = ctx;
  HlXmlLoad *l = ctxt->_private;
  if (l != NULL && !l->saw_doctype)
    {
      l->saw_doctype = true;
      l->doctype_line = xmlSAX2GetLineNumber (ctx);
      hl_text_quote (name ? (const char *) name : "", HL_XML_QUOTED_MAX - 1,
                     l->doctype_name, sizeof l->doctype_name);
    }
  xmlStopParser (ctxt);
}

static void
xml_init_once (void)
{
  xmlInitParser ();
}

void
hl_xml_init (void)
{
  static pthread_once_t once = PTHREAD_ONCE_INIT;
  pthread_once (&once, xml_init_once);
}

void
hl_xml_load_begin (HlXmlLoad *l, const HlXmlKind *kind, const char *name, HlError *err)
{
  memset (l, 0, sizeof *l);
  l->kind = kind;
  l->name = name;
  l->err = err;
  hl_error_clear (err);
  hl_xml_init ();
  /* Catches whatever a context-level handler does not; libxml2 keeps these
   * per thread. */
  l->old_handler = xmlStructuredError;
  l->old_context = xmlStructuredErrorContext;
  xmlSetStructuredErrorFunc (l, xml_error_cb);
}

void
hl_xml_load_end (HlXmlLoad *l)
{
  xmlSetStructuredErrorFunc (l->old_context, l->old_handler);
  /* libxml2 keeps a copy of its last error per thread; it is ours now. */
  xmlResetLastError ();
}

HlStatus
hl_xml_parse (HlXmlLoad *l, const char *data, size_t size, xmlDocPtr *out)
{
  *out = NULL;
  if (size == 0)
    return hl_xml_fail_at (l, HL_ERR_PARSE, 0, NULL, _("the file is empty"));
  if (size > l->kind->max_bytes || size > INT_MAX)
    {
      /* The kind's own sentence, always "%zu ... %u" (hl-xml-load.h). */
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wformat-nonliteral"
      return hl_xml_fail_at (l, HL_ERR_PARSE, 0, NULL, _(l->kind->too_big), size,
                             (unsigned) l->kind->max_bytes);
#pragma GCC diagnostic pop
    }
  if (!hl_plan_scan_ok (data, size, l->name, l->err))
    return l->status = HL_ERR_PARSE;

  xmlParserCtxtPtr ctxt = xmlNewParserCtxt ();
  if (ctxt == NULL || ctxt->sax == NULL)
    {
      xmlFreeParserCtxt (ctxt);
      return hl_xml_fail_at (l, HL_ERR_NOMEM, 0, NULL, _("out of memory"));
    }
  ctxt->_private = l;
  ctxt->sax->internalSubset = doctype_cb;
  ctxt->sax->externalSubset = NULL;
  ctxt->sax->serror = parser_error_cb;
  l->ctxt = ctxt;

  xmlDocPtr doc = xmlCtxtReadMemory (ctxt, data, (int) size,
                                     l->name ? l->name : l->kind->doc_name, NULL,
                                     HL_XML_PARSE_OPTIONS);
  bool well_formed = ctxt->wellFormed;
  l->ctxt = NULL;
  xmlFreeParserCtxt (ctxt);

  if (l->saw_doctype)
    {
      xmlFreeDoc (doc);
      char element[HL_XML_QUOTED_MAX + 16];
      snprintf (element, sizeof element, "<!DOCTYPE %s>", l->doctype_name);
      return hl_xml_fail_at (l, HL_ERR_PARSE, l->doctype_line, element, "%s",
                             _(l->kind->doctype));
    }
  if (doc == NULL || !well_formed)
    {
      xmlFreeDoc (doc);
      return hl_xml_fail_at (l, HL_ERR_PARSE, l->xml_error ? l->xml_line : 0,
                             l->xml_element, _("the file is not well-formed XML: %s"),
                             l->xml_error ? l->xml_message : _("unknown error"));
    }
  *out = doc;
  return HL_OK;
}

/* The kind's own sentences carry the conversions hl-xml-load.h gives them. */
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wformat-nonliteral"
HlStatus
hl_xml_read_file (const HlXmlKind *kind, const char *path, char **out, size_t *out_len,
                  HlError *err)
{
  *out = NULL;
  int fd = open (path, O_RDONLY | O_CLOEXEC | O_NOCTTY | O_NONBLOCK);
  if (fd < 0)
    return hl_error_set (err, HL_ERR_IO, path, _("Cannot open \"%s\": %s"), path,
                         strerror (errno));

  struct stat sb;
  HlStatus st = HL_OK;
  const unsigned max = (unsigned) kind->max_bytes;
  if (fstat (fd, &sb) != 0)
    st = hl_error_set (err, HL_ERR_IO, path, _("Cannot read \"%s\": %s"), path,
                       strerror (errno));
  else if (S_ISDIR (sb.st_mode))
    st = hl_error_set (err, HL_ERR_IO, path, _(kind->is_folder), path);
  else if (!S_ISREG (sb.st_mode))
    st = hl_error_set (err, HL_ERR_IO, path, _("\"%s\" is not a regular file"), path);
  else if ((uintmax_t) sb.st_size > kind->max_bytes)
    st = hl_error_set (err, HL_ERR_PARSE, path, _(kind->file_too_big), path,
                       (intmax_t) sb.st_size, max);
  if (st != HL_OK)
    {
      close (fd);
      return st;
    }

  /* Bounded: the file may have grown since fstat. */
  size_t cap = (size_t) sb.st_size + 1;
  char *data = malloc (cap + 1);
  size_t len = 0;
  while (data != NULL && st == HL_OK)
    {
      if (len == cap)
        {
          if (cap > kind->max_bytes)
            {
              st = hl_error_set (err, HL_ERR_PARSE, path, _(kind->file_grew), path, max);
              break;
            }
          size_t grown_cap = cap * 2 > kind->max_bytes + 1 ? kind->max_bytes + 1 : cap * 2;
          char *grown = realloc (data, grown_cap + 1);
          if (grown == NULL)
            {
              st = hl_error_set (err, HL_ERR_NOMEM, path,
                                 _("Out of memory while reading \"%s\""), path);
              break;
            }
          data = grown;
          cap = grown_cap;
        }
      ssize_t n = read (fd, data + len, cap - len);
      if (n < 0 && errno == EINTR)
        continue;
      if (n < 0)
        st = hl_error_set (err, HL_ERR_IO, path, _("Cannot read \"%s\": %s"), path,
                           strerror (errno));
      else if (n == 0)
        break;
      else
        len += (size_t) n;
    }
  close (fd);
  if (st == HL_OK && data == NULL)
    st = hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory while reading \"%s\""),
                       path);
  if (st != HL_OK)
    {
      free (data);
      return st;
    }
  data[len] = '\0';
  *out = data;
  *out_len = len;
  return HL_OK;
}
#pragma GCC diagnostic pop

/* ---- The compiled-in schemas ------------------------------------------ */

static void
schema_silent_cb (void *data, xmlErrorPtr error)
{
  (void) data;
  (void) error;
}

/* Compiled once per process and only read afterwards: compiling took most
 * of the time of a load. */
static xmlSchemaPtr
schema_get (HlXmlSchema *s)
{
  if (g_once_init_enter (&s->state))
    {
      xmlSchemaPtr compiled = NULL;
      xmlSchemaParserCtxtPtr pctxt = xmlSchemaNewMemParserCtxt (s->text, (int) *s->len);
      if (pctxt != NULL)
        {
          xmlSchemaSetParserStructuredErrors (pctxt, schema_silent_cb, NULL);
          compiled = xmlSchemaParse (pctxt);
          xmlSchemaFreeParserCtxt (pctxt);
        }
      g_once_init_leave (&s->state, compiled != NULL ? (gsize) compiled : 1);
    }
  return s->state > 1 ? (xmlSchemaPtr) s->state : NULL;
}

HlStatus
hl_xml_validate (HlXmlLoad *l, HlXmlSchema *schema, xmlDocPtr doc)
{
  l->xml_error = false;
  l->xml_node = NULL;
  l->xml_line = 0;
  xmlSchemaPtr compiled = schema_get (schema);
  if (compiled == NULL)
    return hl_xml_fail_at (l, HL_ERR_PARSE, 0, NULL, "%s", _(l->kind->schema_broken));

  xmlSchemaValidCtxtPtr vctxt = xmlSchemaNewValidCtxt (compiled);
  if (vctxt == NULL)
    return hl_xml_fail_at (l, HL_ERR_NOMEM, 0, NULL, _("out of memory"));
  xmlSchemaSetValidStructuredErrors (vctxt, xml_error_cb, l);
  int rc = xmlSchemaValidateDoc (vctxt, doc);
  xmlSchemaFreeValidCtxt (vctxt);
  return rc == 0 ? HL_OK : HL_ERR_PARSE;
}

const char *
hl_xml_schema_message (const HlXmlLoad *l)
{
  const char *msg = l->xml_error ? l->xml_message : _(l->kind->no_match);
  /* Drop libxml2's "Element 'x': " lead-in; the element is named already. */
  if (strncmp (msg, "Element '", 9) == 0)
    {
      const char *end = strstr (msg, "': ");
      if (end != NULL)
        msg = end + 3;
    }
  return msg;
}
