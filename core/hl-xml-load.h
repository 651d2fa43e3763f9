/* hl-xml-load.h: the hardened XML load shared by plans and catalogues.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * One way to read an XML file people hand us: a size cap, the linear
 * pre-scan (hl-plan-scan.h), libxml2 without network and refusing any
 * DOCTYPE (so no entity is ever declared or fetched), the parser's errors
 * in our words with the line they are on, and a compiled-in XSD compiled
 * once per process.  The file's own walk (hl-plan-io.c, hl-catalogue.c)
 * names elements its own way and calls hl_xml_fail_at for its messages:
 * "NAME: line N, element <E>: what is wrong".
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include <glib.h>
#include <libxml/parser.h>
#include <libxml/tree.h>
#include <libxml/xmlerror.h>
#include <libxml/xmlschemas.h>

#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Bytes of a value quoted in a message (an element name, a DOCTYPE). */
#define HL_XML_QUOTED_MAX 40

/* A compiled-in schema: declare with HL_XML_SCHEMA_INIT at file scope. */
typedef struct {
  const char *text;          /* the XSD, NUL-terminated */
  const size_t *len;
  gsize state;               /* 0 not compiled, 1 does not compile, else the schema */
} HlXmlSchema;

#define HL_XML_SCHEMA_INIT(text, len) { (text), &(len), 0 }

/* What a kind of file says about itself in the load's messages. */
typedef struct {
  const char *doc_name;      /* name for the parser when the caller gives none */
  const char *ns;            /* namespace stripped from libxml2's messages */
  size_t max_bytes;
  /* "the file is %zu bytes, more than the %u bytes a ... may have" */
  const char *too_big;
  /* the message for a DOCTYPE: it is refused, whatever it declares */
  const char *doctype;
  /* "the file does not match the ... schema" */
  const char *no_match;
  /* "internal error: the built-in ... schema does not compile" */
  const char *schema_broken;
  /* Reading the file: "\"%s\" is a folder, not a ... file" (the path),
   * "\"%s\" is %jd bytes, more than the %u bytes a ... may have" (the
   * path, its size, max_bytes), "\"%s\" is more than the %u bytes a ...
   * may have" (the path, max_bytes: it grew while it was read). */
  const char *is_folder;
  const char *file_too_big;
  const char *file_grew;
} HlXmlKind;

typedef struct {
  const HlXmlKind *kind;
  const char *name;          /* file name for messages, may be NULL */
  HlError *err;
  HlStatus status;           /* the first failure */
  xmlParserCtxtPtr ctxt;     /* while parsing */
  bool saw_doctype;
  int doctype_line;
  char doctype_name[HL_XML_QUOTED_MAX];
  /* the first libxml2 error, in our words */
  bool xml_error;
  int xml_line;
  xmlNodePtr xml_node;       /* the element a schema error is about */
  char xml_element[HL_XML_QUOTED_MAX];
  char xml_message[HL_ERROR_MESSAGE_MAX];
  /* libxml2's handler before hl_xml_load_begin, put back by _end */
  xmlStructuredErrorFunc old_handler;
  void *old_context;
} HlXmlLoad;

/* Initialises libxml2 once per process (libxml2 2.9 asks for it before
 * threads use it: its lazy set-up is not thread-safe); every reader and
 * writer of XML calls it first.  Safe from any thread, any number of
 * times. */
void hl_xml_init (void);

/* Starts a load: clears err, routes libxml2's errors of this thread to l. */
void hl_xml_load_begin (HlXmlLoad *l, const HlXmlKind *kind, const char *name,
                        HlError *err);
/* Puts libxml2's error handler back and forgets its last error. */
void hl_xml_load_end (HlXmlLoad *l);

/* Records the first failure as "NAME: line N, element E: message" (line
 * and element left out when 0 / NULL or empty); err->field is `element`. */
HlStatus hl_xml_fail_at (HlXmlLoad *l, HlStatus status, int line, const char *element,
                         const char *fmt, ...)
  __attribute__ ((format (printf, 5, 6)));

/* The line an element starts on, 0 when unknown. */
int hl_xml_node_line (xmlNodePtr node);

/* The bytes of a regular file, at most kind->max_bytes of them (checked
 * before and while reading: the file may grow), NUL-terminated, malloc'd
 * into *data; opened non-blocking, so that a named pipe given by mistake
 * cannot hang the open.  HL_OK, or HL_ERR_IO / HL_ERR_PARSE / HL_ERR_NOMEM
 * with a message naming the path. */
HlStatus hl_xml_read_file (const HlXmlKind *kind, const char *path, char **data,
                           size_t *len, HlError *err);

/* Size cap, pre-scan, hardened parse: *out is the document, or NULL and
 * the failure recorded. */
HlStatus hl_xml_parse (HlXmlLoad *l, const char *data, size_t size, xmlDocPtr *out);

/* Validates doc against the schema.  HL_OK; or HL_ERR_PARSE with
 * l->xml_node, l->xml_line and hl_xml_schema_message() telling where and
 * what, nothing recorded yet (the caller may say it better); or another
 * failure, recorded. */
HlStatus hl_xml_validate (HlXmlLoad *l, HlXmlSchema *schema, xmlDocPtr doc);

/* The schema's complaint without libxml2's "Element 'x': " lead-in. */
const char *hl_xml_schema_message (const HlXmlLoad *l);

#ifdef __cplusplus
}
#endif
