/* test-hostile.c: hostile plan files, each refused quickly, in little memory,
 * without touching the network or any file the plan points at.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each case writes its file into a fresh temporary folder and loads it in
 * a forked child, so that a crash, a hang or a memory blow-up stays in the
 * child and the peak memory of one load can be read alone.  The child
 * reports the status and message, the wall time of the load
 * (clock_gettime) and its peak resident memory before and after
 * (getrusage ru_maxrss).  The limits are the issue's: a refusal with a
 * clear message in under HL_HOSTILE_MAX_SECONDS and under
 * HL_HOSTILE_MAX_MEMORY_KB of extra memory.
 *
 * "Nothing is fetched" is observed, not assumed:
 *  - network: the DTD and entity URLs point at a TCP socket of this test
 *    listening on 127.0.0.1 (port 9 when it can be bound, else any free
 *    port).  A connect() by the loader would complete in the kernel's
 *    backlog, so after the load a non-blocking accept() must find nothing;
 *  - local files: the secret file the entities point at is watched with
 *    inotify (IN_OPEN, IN_ACCESS); after the load no event may be queued,
 *    and its marker text must not appear in the message.
 *
 * Dense files (many attributes on one element, tiny elements up to the size
 * cap) are refused by the loader's pre-scan (core/hl-plan-scan.h); the
 * largest plan its limits let through must still load within the limits.
 *
 * UTF-16 (with and without a byte-order mark) is refused with a message
 * about its encoding: plan files are UTF-8, and nothing else is parsed.
 */
#include "config.h"

#include <arpa/inet.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <netinet/in.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/inotify.h>
#include <sys/mman.h>
#include <sys/resource.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "hl-plan-io.h"
#include "hl-plan-scan.h"
#include "hl-test-util.h"

/* The limits for refusing one hostile file. */
#define HL_HOSTILE_MAX_SECONDS 1.0
#define HL_HOSTILE_MAX_MEMORY_KB (50L * 1024L)

/* Under AddressSanitizer every access is checked (about 2x time is typical,
 * from memory), so the time limit is widened there.  Its memory is not
 * compared at all: redzones around every block and the quarantine of freed
 * blocks multiply the footprint of libxml2's many small allocations (the
 * largest plan the loader takes: 21 MB in the normal build, 226-390 MB
 * under ASan).  The normal build asserts the memory limit. */
#if defined(__SANITIZE_ADDRESS__)
# define HL_HOSTILE_UNDER_ASAN 1
#elif defined(__has_feature)
# if __has_feature(address_sanitizer)
#  define HL_HOSTILE_UNDER_ASAN 1
# endif
#endif
#ifdef HL_HOSTILE_UNDER_ASAN
# define HL_HOSTILE_TIME_FACTOR 4.0
# define HL_HOSTILE_CHECK_MEMORY false
#else
# define HL_HOSTILE_TIME_FACTOR 1.0
# define HL_HOSTILE_CHECK_MEMORY true
#endif

/* A load still running after this is a hang: the child is killed. */
#define HL_HOSTILE_KILL_SECONDS 30

#define HL_MIB (1024L * 1024L)
#define HL_HUGE_FILE_BYTES (200L * HL_MIB)
#define HL_BIG_ATTRIBUTE_BYTES (10L * HL_MIB)
/* Under the size cap, so that the parser itself meets the long value. */
#define HL_LONG_ATTRIBUTE_BYTES (7L * HL_MIB)
#define HL_DEEP_NESTING 10000
#define HL_MANY_ATTRIBUTES 16000
#define HL_OPTION_ATTRIBUTES 7
/* Room left under the size cap for the declaration and the closing tags. */
#define HL_FLOOD_MARGIN_BYTES 256
#define HL_GARBAGE_BYTES (64L * 1024L)
#define HL_GARBAGE_SEED 0x9e3779b97f4a7c15u
/* 10 levels of 10 references: 10^10 characters if it were expanded. */
#define HL_LAUGH_LEVELS 10

#define HL_SECRET_MARKER "hiplever-secret-3f9c1a"
#define HL_DIR_MAX 256
#define HL_PATH_MAX 512

typedef enum {
  HL_LOAD_FILE,      /* hl_plan_load_file on the written file */
  HL_LOAD_MAPPED,    /* the file mapped, untouched, to hl_plan_load_buffer */
} HlLoadWay;

typedef enum {
  HL_MUST_REFUSE,
  HL_REFUSE_OR_SAME,  /* refused, or read as exactly the base plan */
  HL_MAY_ACCEPT,      /* a plan at the loader's limits: only time and memory */
} HlExpect;

typedef struct {
  char dir[HL_DIR_MAX];
  char secret[HL_PATH_MAX];
  int port;
  char *base;          /* the base plan, serialised */
  size_t base_size;
} Env;

typedef enum {
  HL_FILE_WRITTEN = 0,  /* written by `make` into the temporary folder */
  HL_FILE_FIFO,         /* a named pipe with no writer: must not hang */
  HL_FILE_SYSTEM,       /* `file` is an absolute path such as /dev/zero */
} HlFileKind;

typedef struct {
  const char *file;                 /* name in the temporary folder */
  void (*make) (FILE *f, const Env *env);
  HlLoadWay way;
  HlExpect expect;
  const char *words[3];             /* the message names the problem */
  HlFileKind kind;
} HostileCase;

/* What the child reports. */
typedef struct {
  HlStatus status;
  HlError err;
  bool plan_returned;
  bool same_as_base;
  double seconds;
  long rss_before_kb;
  long rss_after_kb;
} Outcome;

/* ---- Writers ---------------------------------------------------------- */

static const char xml_decl[] = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
static const char plan_open[] =
  "<plan xmlns=\"" HL_PLAN_NAMESPACE "\" format-version=\"1\">\n";
static const char plan_body[] =
  "  <landmarks>\n"
  "    <landmark name=\"hip-centre\" x-mm=\"-95\" y-mm=\"0\"/>\n"
  "    <landmark name=\"midline\" x-mm=\"0\" y-mm=\"-35\"/>\n"
  "    <landmark name=\"abductor-insertion\" x-mm=\"-155\" y-mm=\"-8\"/>\n"
  "  </landmarks>\n";

static void
put_repeated (FILE *f, char c, long n)
{
  char chunk[4096];
  memset (chunk, c, sizeof chunk);
  for (; n > 0; n -= (long) sizeof chunk)
    fwrite (chunk, 1, n < (long) sizeof chunk ? (size_t) n : sizeof chunk, f);
}

static void
put_case (FILE *f, const char *label)
{
  fprintf (f, "  <case label=\"%s\" mass-kg=\"72.5\" operated-side=\"right\"/>\n", label);
}

static void
put_laugh_dtd (FILE *f)
{
  fputs ("<!DOCTYPE plan [\n  <!ENTITY lol0 \"lol\">\n", f);
  for (int i = 1; i < HL_LAUGH_LEVELS; i++)
    {
      fprintf (f, "  <!ENTITY lol%d \"", i);
      for (int j = 0; j < 10; j++)
        fprintf (f, "&lol%d;", i - 1);
      fputs ("\">\n", f);
    }
  fputs ("]>\n", f);
}

static void
make_billion_laughs (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  put_laugh_dtd (f);
  fputs (plan_open, f);
  fprintf (f, "  <case label=\"&lol%d;\" mass-kg=\"72.5\" operated-side=\"right\"/>\n",
           HL_LAUGH_LEVELS - 1);
  fputs (plan_body, f);
  fprintf (f, "  <notes>&lol%d;</notes>\n</plan>\n", HL_LAUGH_LEVELS - 1);
}

/* The same bomb, in UTF-16LE with a byte-order mark. */
static void
make_billion_laughs_utf16 (FILE *f, const Env *env)
{
  char *text = NULL;
  size_t size = 0;
  FILE *mem = open_memstream (&text, &size);
  ck_assert_ptr_nonnull (mem);
  fputs ("<?xml version=\"1.0\" encoding=\"UTF-16\"?>\n", mem);
  put_laugh_dtd (mem);
  fputs (plan_open, mem);
  put_case (mem, "x");
  fputs (plan_body, mem);
  fprintf (mem, "  <notes>&lol%d;</notes>\n</plan>\n", HL_LAUGH_LEVELS - 1);
  fclose (mem);
  fputc (0xff, f);
  fputc (0xfe, f);
  for (size_t i = 0; i < size; i++)
    {
      fputc (text[i], f);
      fputc (0, f);
    }
  free (text);
}

static void
make_undeclared_entities (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  put_case (f, "x");
  fputs (plan_body, f);
  fputs ("  <notes>", f);
  for (int i = 0; i < 100000; i++)
    fputs ("&lol9;", f);
  fputs ("</notes>\n</plan>\n", f);
}

/* References to an undeclared entity up to the size cap: millions of
 * errors, unless the parser stops at the first. */
static void
make_entity_flood (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  fputs ("  <notes>", f);
  long room = (long) HL_PLAN_MAX_BYTES - HL_FLOOD_MARGIN_BYTES;
  for (long n = 0; n + 3 <= room; n += 3)
    fputs ("&a;", f);
  fputs ("</notes>\n</plan>\n", f);
}

static void
make_external_entity_url (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fprintf (f, "<!DOCTYPE plan [\n  <!ENTITY secret SYSTEM \"file://%s\">\n]>\n", env->secret);
  fputs (plan_open, f);
  put_case (f, "&secret;");
  fputs (plan_body, f);
  fputs ("  <notes>&secret;</notes>\n</plan>\n", f);
}

static void
make_external_entity_path (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fprintf (f, "<!DOCTYPE plan [\n  <!ENTITY secret SYSTEM \"%s\">\n]>\n", env->secret);
  fputs (plan_open, f);
  put_case (f, "x");
  fputs (plan_body, f);
  fputs ("  <notes>&secret;</notes>\n</plan>\n", f);
}

static void
make_network_dtd (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fprintf (f, "<!DOCTYPE plan SYSTEM \"http://127.0.0.1:%d/evil.dtd\">\n", env->port);
  fputs (plan_open, f);
  put_case (f, "x");
  fputs (plan_body, f);
  fputs ("</plan>\n", f);
}

static void
make_network_parameter_entity (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fprintf (f, "<!DOCTYPE plan [\n  <!ENTITY %% remote SYSTEM "
           "\"http://127.0.0.1:%d/evil.dtd\">\n  %%remote;\n]>\n", env->port);
  fputs (plan_open, f);
  put_case (f, "x");
  fputs (plan_body, f);
  fputs ("</plan>\n", f);
}

static void
make_xinclude (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs ("<plan xmlns=\"" HL_PLAN_NAMESPACE "\" "
         "xmlns:xi=\"http://www.w3.org/2001/XInclude\" format-version=\"1\">\n", f);
  put_case (f, "x");
  fputs (plan_body, f);
  fprintf (f, "  <notes><xi:include href=\"%s\" parse=\"text\"/>"
           "<xi:include href=\"http://127.0.0.1:%d/evil.xml\" parse=\"text\"/></notes>\n"
           "</plan>\n", env->secret, env->port);
}

/* The base plan with schema hints at the listener and the secret: a
 * validator that followed them would connect or open. */
static void
make_schema_location (FILE *f, const Env *env)
{
  const char *root = strstr (env->base, "<plan ");
  ck_assert_ptr_nonnull (root);
  fwrite (env->base, 1, (size_t) (root - env->base), f);
  fprintf (f, "<plan xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\" "
           "xsi:schemaLocation=\"" HL_PLAN_NAMESPACE " http://127.0.0.1:%d/evil.xsd\" "
           "xsi:noNamespaceSchemaLocation=\"file://%s\" ", env->port, env->secret);
  fputs (root + strlen ("<plan "), f);
}

static void
make_huge (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  fflush (f);
  ck_assert_int_eq (ftruncate (fileno (f), HL_HUGE_FILE_BYTES), 0);
}

static void
make_deep_nesting (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  put_case (f, "x");
  fputs (plan_body, f);
  for (int i = 0; i < HL_DEEP_NESTING; i++)
    fputs ("<notes>", f);
  for (int i = 0; i < HL_DEEP_NESTING; i++)
    fputs ("</notes>", f);
  fputs ("\n</plan>\n", f);
}

static void
put_long_label (FILE *f, long n)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  fputs ("  <case label=\"", f);
  put_repeated (f, 'A', n);
  fputs ("\" mass-kg=\"72.5\" operated-side=\"right\"/>\n", f);
  fputs (plan_body, f);
  fputs ("</plan>\n", f);
}

static void
make_big_attribute (FILE *f, const Env *env)
{
  put_long_label (f, HL_BIG_ATTRIBUTE_BYTES);
}

static void
make_long_attribute (FILE *f, const Env *env)
{
  put_long_label (f, HL_LONG_ATTRIBUTE_BYTES);
}

/* One element with more attributes than any plan: libxml2's duplicate
 * check is quadratic in their number (1.3 s for these before the pre-scan). */
static void
make_many_attributes (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  fputs ("  <case", f);
  for (int i = 0; i < HL_MANY_ATTRIBUTES; i++)
    fprintf (f, " a%x=\"\"", (unsigned) i);
  fputs ("/>\n", f);
  fputs (plan_body, f);
  fputs ("</plan>\n", f);
}

/* Tiny elements up to the size cap: a tree of some 200 MB. */
static void
make_dense_elements (FILE *f, const Env *env)
{
  fputs (xml_decl, f);
  fputs (plan_open, f);
  fputs ("  <notes>", f);
  long room = (long) HL_PLAN_MAX_BYTES - HL_FLOOD_MARGIN_BYTES;
  for (long n = 0; n + 4 <= room; n += 4)
    fputs ("<a/>", f);
  fputs ("</notes>\n</plan>\n", f);
}

/* The base plan with `n` more options, each with every attribute. */
static void
put_options (FILE *f, const Env *env, long n, long room)
{
  const char *at = strstr (env->base, "<options>");
  ck_assert_ptr_nonnull (at);
  at += strlen ("<options>");
  fwrite (env->base, 1, (size_t) (at - env->base), f);
  long written = (long) (at - env->base);
  for (long k = 0; k < n && written < room; k++)
    {
      int len = fprintf (f, "\n<option name=\"Option %ld\" cup-medial-mm=\"2.125\" "
                         "cup-superior-mm=\"1.5\" femoral-offset-mm=\"%.1f\" "
                         "femoral-length-mm=\"2\" head-length-mm=\"0\" "
                         "neck-shaft-angle-deg=\"135\"/>", k, (double) (k % 100) / 10.0);
      written += len;
    }
  fputs (at, f);
}

/* Valid options up to the size cap: far more elements than a plan has. */
static void
make_dense_options (FILE *f, const Env *env)
{
  put_options (f, env, LONG_MAX, (long) HL_PLAN_MAX_BYTES - (long) env->base_size);
}

/* Options up to the attribute limit (some 8,000): refused by the limit of
 * HL_PLAN_MAX_OPTIONS options before any parsing, within time and memory. */
static void
make_options_at_limit (FILE *f, const Env *env)
{
  long n = 0;
  for (const char *q = env->base; (q = strstr (q, "=\"")) != NULL; q++)
    n++;
  put_options (f, env, (HL_PLAN_SCAN_MAX_ATTRIBUTES - n) / HL_OPTION_ATTRIBUTES,
               (long) HL_PLAN_MAX_BYTES - (long) env->base_size);
}

static void
make_garbage (FILE *f, const Env *env)
{
  uint64_t x = HL_GARBAGE_SEED;   /* xorshift64 (Marsaglia 2003, J Stat Softw 8(14)) */
  for (long i = 0; i < HL_GARBAGE_BYTES; i++)
    {
      x ^= x << 13;
      x ^= x >> 7;
      x ^= x << 17;
      fputc ((int) (x & 0xff), f);
    }
}

static void
make_nul_inside (FILE *f, const Env *env)
{
  size_t half = env->base_size / 2;
  fwrite (env->base, 1, half, f);
  fputc ('\0', f);
  fwrite (env->base + half, 1, env->base_size - half, f);
}

static void
make_truncated (FILE *f, const Env *env)
{
  fwrite (env->base, 1, env->base_size / 2, f);
}

/* Cut after the first byte of a two-byte UTF-8 character of the label. */
static void
make_truncated_utf8 (FILE *f, const Env *env)
{
  const char *e = strstr (env->base, "\xc3\xa9");
  ck_assert_ptr_nonnull (e);
  fwrite (env->base, 1, (size_t) (e - env->base) + 1, f);
}

/* The base plan in UTF-16, its declaration saying so. */
static void
put_utf16 (FILE *f, const Env *env, bool bom, bool big_endian)
{
  static const char from[] = "encoding=\"UTF-8\"";
  static const char to[] = "encoding=\"UTF-16\"";
  const char *decl = strstr (env->base, from);
  ck_assert_ptr_nonnull (decl);

  if (bom)
    {
      fputc (big_endian ? 0xfe : 0xff, f);
      fputc (big_endian ? 0xff : 0xfe, f);
    }
  /* Only the characters of the base plan: ASCII and a few two-byte UTF-8
   * characters, all in the basic plane. */
  const unsigned char *p = (const unsigned char *) env->base;
  const unsigned char *end = p + env->base_size;
  while (p < end)
    {
      unsigned cp;
      if ((const char *) p == decl)
        {
          for (const char *t = to; *t; t++)
            {
              fputc (big_endian ? 0 : *t, f);
              fputc (big_endian ? *t : 0, f);
            }
          p += sizeof from - 1;
          continue;
        }
      if (*p < 0x80)
        cp = *p++;
      else
        {
          ck_assert_int_eq (*p & 0xe0, 0xc0);
          cp = (unsigned) (p[0] & 0x1f) << 6 | (p[1] & 0x3f);
          p += 2;
        }
      fputc (big_endian ? (int) (cp >> 8) : (int) (cp & 0xff), f);
      fputc (big_endian ? (int) (cp & 0xff) : (int) (cp >> 8), f);
    }
}

static void
make_utf16_bom (FILE *f, const Env *env)
{
  put_utf16 (f, env, true, false);
}

static void
make_utf16_no_bom (FILE *f, const Env *env)
{
  put_utf16 (f, env, false, false);
}

static void
make_utf16be_bom (FILE *f, const Env *env)
{
  put_utf16 (f, env, true, true);
}

static const HostileCase cases[] = {
  { "billion-laughs.hlplan", make_billion_laughs, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "document type", "DOCTYPE", "entit" } },
  { "billion-laughs-utf16.hlplan", make_billion_laughs_utf16, HL_LOAD_FILE,
    HL_MUST_REFUSE, { "document type", "DOCTYPE", "UTF-16" } },
  { "undeclared-entities.hlplan", make_undeclared_entities, HL_LOAD_FILE,
    HL_MUST_REFUSE, { "entity", "lol9", NULL } },
  { "entity-flood.hlplan", make_entity_flood, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "entity", NULL, NULL } },
  { "external-entity-url.hlplan", make_external_entity_url, HL_LOAD_FILE,
    HL_MUST_REFUSE, { "document type", "DOCTYPE", "entit" } },
  { "external-entity-path.hlplan", make_external_entity_path, HL_LOAD_FILE,
    HL_MUST_REFUSE, { "document type", "DOCTYPE", "entit" } },
  { "network-dtd.hlplan", make_network_dtd, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "document type", "DOCTYPE", "DTD" } },
  { "network-parameter-entity.hlplan", make_network_parameter_entity, HL_LOAD_FILE,
    HL_MUST_REFUSE, { "document type", "DOCTYPE", "entit" } },
  { "xinclude.hlplan", make_xinclude, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "include", "notes", NULL } },
  { "schema-location.hlplan", make_schema_location, HL_LOAD_FILE, HL_REFUSE_OR_SAME,
    { "schemaLocation", "attribute", NULL } },
  { "huge.hlplan", make_huge, HL_LOAD_FILE, HL_MUST_REFUSE, { "bytes", NULL, NULL } },
  { "huge-mapped.hlplan", make_huge, HL_LOAD_MAPPED, HL_MUST_REFUSE,
    { "bytes", NULL, NULL } },
  { "deep-nesting.hlplan", make_deep_nesting, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "depth", "nest", NULL } },
  { "big-attribute.hlplan", make_big_attribute, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "bytes", NULL, NULL } },
  { "long-attribute.hlplan", make_long_attribute, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "label", "long", NULL } },
  { "many-attributes.hlplan", make_many_attributes, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "attributes", NULL, NULL } },
  { "dense-elements.hlplan", make_dense_elements, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "elements", NULL, NULL } },
  { "dense-options.hlplan", make_dense_options, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "64 options", NULL, NULL } },
  { "options-at-limit.hlplan", make_options_at_limit, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "64 options", NULL, NULL } },
  { "garbage.hlplan", make_garbage, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "well-formed", "XML", NULL } },
  { "nul-inside.hlplan", make_nul_inside, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "well-formed", "XML", NULL } },
  { "truncated.hlplan", make_truncated, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "well-formed", "XML", NULL } },
  { "truncated-utf8.hlplan", make_truncated_utf8, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "well-formed", "UTF-8", "encoding" } },
  { "fifo.hlplan", NULL, HL_LOAD_FILE, HL_MUST_REFUSE, { "regular file", NULL, NULL },
    HL_FILE_FIFO },
  { "/dev/zero", NULL, HL_LOAD_FILE, HL_MUST_REFUSE, { "regular file", NULL, NULL },
    HL_FILE_SYSTEM },
  { "/dev/urandom", NULL, HL_LOAD_FILE, HL_MUST_REFUSE, { "regular file", NULL, NULL },
    HL_FILE_SYSTEM },
  { "utf16-bom.hlplan", make_utf16_bom, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "UTF-16", "encoding", NULL } },
  { "utf16-no-bom.hlplan", make_utf16_no_bom, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "UTF-16", "encoding", NULL } },
  { "utf16be-bom.hlplan", make_utf16be_bom, HL_LOAD_FILE, HL_MUST_REFUSE,
    { "UTF-16", "encoding", NULL } },
};
#define N_CASES ((int) (sizeof cases / sizeof cases[0]))

/* ---- The environment: folder, secret file, listener, base plan --------- */

static int
listen_local (int *port)
{
  int fd = socket (AF_INET, SOCK_STREAM | SOCK_NONBLOCK | SOCK_CLOEXEC, 0);
  ck_assert_msg (fd >= 0, "socket: %s", strerror (errno));
  int one = 1;
  setsockopt (fd, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one);

  struct sockaddr_in a = { .sin_family = AF_INET };
  a.sin_addr.s_addr = htonl (INADDR_LOOPBACK);
  /* Port 9 is the one the issue names; binding it needs privileges, so
   * any free port does as well. */
  a.sin_port = htons (9);
  if (bind (fd, (struct sockaddr *) &a, sizeof a) != 0)
    {
      a.sin_port = 0;
      ck_assert_msg (bind (fd, (struct sockaddr *) &a, sizeof a) == 0, "bind: %s",
                     strerror (errno));
    }
  ck_assert_int_eq (listen (fd, 16), 0);
  socklen_t len = sizeof a;
  ck_assert_int_eq (getsockname (fd, (struct sockaddr *) &a, &len), 0);
  *port = ntohs (a.sin_port);
  return fd;
}

static void
env_init (Env *env)
{
  memset (env, 0, sizeof *env);
  const char *tmp = getenv ("TMPDIR") ? getenv ("TMPDIR") : "/tmp";
  ck_assert_int_lt (snprintf (env->dir, sizeof env->dir, "%.200s/hl-hostile-XXXXXX", tmp),
                    (int) sizeof env->dir);
  ck_assert_ptr_nonnull (mkdtemp (env->dir));
  snprintf (env->secret, sizeof env->secret, "%s/secret.txt", env->dir);
  FILE *f = fopen (env->secret, "w");
  ck_assert_ptr_nonnull (f);
  fputs (HL_SECRET_MARKER "\n", f);
  fclose (f);

  /* An invented plan (the demo geometry) with an accented label, so that
   * the UTF-8 and UTF-16 cases have characters beyond ASCII. */
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  snprintf (plan->label, sizeof plan->label, "%s", "Cas d\xc3\xa9mo (invented)");
  HlRecon recon;
  hl_recon_init (&recon);
  recon.femoral_offset_mm = 4.25;
  ck_assert_int_ge (hl_plan_add_option (plan, "Offset +4.25", &recon), 0);
  HlError err = { 0 };
  HlStatus st = hl_plan_to_buffer (plan, &env->base, &env->base_size, &err);
  ck_assert_msg (st == HL_OK, "base plan: %s", err.message);
  hl_plan_free (plan);
}

static void
env_clear (Env *env, const HostileCase *c)
{
  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/%.200s", env->dir, c->file);
  if (c->kind != HL_FILE_SYSTEM)
    unlink (path);
  unlink (env->secret);
  rmdir (env->dir);
  free (env->base);
}

/* ---- The child -------------------------------------------------------- */

static long
peak_rss_kb (void)
{
  struct rusage ru;
  getrusage (RUSAGE_SELF, &ru);
  return ru.ru_maxrss;
}

static double
now_seconds (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + (double) ts.tv_nsec * 1e-9;
}

static bool
same_plan_text (const HlPlan *plan, const Env *env)
{
  char *text = NULL;
  size_t size = 0;
  HlError err = { 0 };
  bool same = hl_plan_to_buffer (plan, &text, &size, &err) == HL_OK
              && size == env->base_size && memcmp (text, env->base, size) == 0;
  free (text);
  return same;
}

static void
load_in_child (const HostileCase *c, const Env *env, const char *path, int out_fd)
{
  Outcome o;
  HlPlan *plan = NULL;
  const char *data = NULL;
  size_t size = 0;

  alarm (HL_HOSTILE_KILL_SECONDS);
  memset (&o, 0, sizeof o);
  if (c->way == HL_LOAD_MAPPED)
    {
      int fd = open (path, O_RDONLY);
      struct stat st;
      if (fd < 0 || fstat (fd, &st) != 0)
        _exit (3);
      size = (size_t) st.st_size;
      data = mmap (NULL, size, PROT_READ, MAP_PRIVATE, fd, 0);
      close (fd);
      if (data == MAP_FAILED)
        _exit (3);
    }

  o.rss_before_kb = peak_rss_kb ();
  double t0 = now_seconds ();
  if (c->way == HL_LOAD_MAPPED)
    o.status = hl_plan_load_buffer (data, size, c->file, &plan, &o.err);
  else
    o.status = hl_plan_load_file (path, &plan, &o.err);
  o.seconds = now_seconds () - t0;
  o.rss_after_kb = peak_rss_kb ();

  o.plan_returned = plan != NULL;
  if (plan != NULL)
    o.same_as_base = same_plan_text (plan, env);
  hl_plan_free (plan);
  if (write (out_fd, &o, sizeof o) != (ssize_t) sizeof o)
    _exit (4);
  _exit (0);
}

/* ---- The test --------------------------------------------------------- */

static int
pending_connections (int listener)
{
  int n = 0;
  for (;;)
    {
      int fd = accept (listener, NULL, NULL);
      if (fd < 0)
        break;
      close (fd);
      n++;
    }
  return n;
}

static int
pending_file_events (int watch_fd)
{
  char buf[4096] __attribute__ ((aligned (__alignof__ (struct inotify_event))));
  ssize_t n = read (watch_fd, buf, sizeof buf);
  return n > 0 ? (int) n : 0;
}

START_TEST (test_hostile_file)
{
  const HostileCase *c = &cases[_i];
  Env env;
  env_init (&env);
  int listener = listen_local (&env.port);

  char path[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/%.200s", env.dir, c->file);
  if (c->kind == HL_FILE_SYSTEM)
    snprintf (path, sizeof path, "%s", c->file);
  else if (c->kind == HL_FILE_FIFO)
    ck_assert_int_eq (mkfifo (path, 0600), 0);
  else
    {
      FILE *f = fopen (path, "wb");
      ck_assert_ptr_nonnull (f);
      c->make (f, &env);
      ck_assert_int_eq (fclose (f), 0);
    }

  int watch = inotify_init1 (IN_NONBLOCK | IN_CLOEXEC);
  ck_assert_int_ge (watch, 0);
  ck_assert_int_ge (inotify_add_watch (watch, env.secret, IN_OPEN | IN_ACCESS), 0);

  int pipe_fd[2];
  ck_assert_int_eq (pipe (pipe_fd), 0);
  fflush (NULL);
  pid_t pid = fork ();
  ck_assert_int_ge (pid, 0);
  if (pid == 0)
    {
      close (pipe_fd[0]);
      load_in_child (c, &env, path, pipe_fd[1]);
    }
  close (pipe_fd[1]);
  Outcome o;
  memset (&o, 0, sizeof o);
  ssize_t got = read (pipe_fd[0], &o, sizeof o);
  close (pipe_fd[0]);
  int wstatus = 0;
  ck_assert_int_eq (waitpid (pid, &wstatus, 0), pid);

  ck_assert_msg (WIFEXITED (wstatus) && WEXITSTATUS (wstatus) == 0
                 && got == (ssize_t) sizeof o,
                 "%s: the load did not finish normally (%s %d)", c->file,
                 WIFSIGNALED (wstatus) ? "signal" : "exit status",
                 WIFSIGNALED (wstatus) ? WTERMSIG (wstatus) : WEXITSTATUS (wstatus));

  int connections = pending_connections (listener);
  int file_events = pending_file_events (watch);
  close (listener);
  close (watch);

  long memory_kb = o.rss_after_kb - o.rss_before_kb;
  fprintf (stderr, "%-34s %-14s %.3f s %6ld kB  %s\n", c->file,
           hl_status_name (o.status), o.seconds, memory_kb, o.err.message);

  ck_assert_msg (connections == 0, "%s: the loader connected to 127.0.0.1:%d",
                 c->file, env.port);
  ck_assert_msg (file_events == 0, "%s: the loader opened or read %s", c->file,
                 env.secret);
  ck_assert_msg (!hl_test_contains_ci (o.err.message, HL_SECRET_MARKER),
                 "%s: the secret file's text is in the message", c->file);
  ck_assert_msg (o.seconds < HL_HOSTILE_MAX_SECONDS * HL_HOSTILE_TIME_FACTOR,
                 "%s: %.3f s to answer", c->file, o.seconds);
  ck_assert_msg (!HL_HOSTILE_CHECK_MEMORY || memory_kb < HL_HOSTILE_MAX_MEMORY_KB,
                 "%s: %ld kB more memory", c->file, memory_kb);

  if (o.status == HL_OK)
    {
      ck_assert_msg (c->expect != HL_MUST_REFUSE, "%s: accepted", c->file);
      ck_assert_msg (o.plan_returned, "%s: HL_OK without a plan", c->file);
      ck_assert_msg (c->expect == HL_MAY_ACCEPT || o.same_as_base,
                     "%s: accepted, but not as the plan its UTF-8 twin gives", c->file);
    }
  else
    {
      ck_assert_msg (!o.plan_returned, "%s: a plan returned with a refusal", c->file);
      ck_assert_int_eq (o.err.status, o.status);
      /* Where: the file; what: one of the case's words. */
      ck_assert_msg (hl_test_contains_ci (o.err.message, c->file),
                     "%s: the message does not name the file: %s", c->file,
                     o.err.message);
      bool named = false;
      for (int w = 0; w < 3 && c->words[w] != NULL; w++)
        named = named || hl_test_contains_ci (o.err.message, c->words[w]);
      ck_assert_msg (named, "%s: the message does not say what is wrong (%s): %s",
                     c->file, c->words[0], o.err.message);
    }
  env_clear (&env, c);
}
END_TEST

/* ---- The pre-scan's counting, case by case ----------------------------- */

typedef struct {
  const char *what;
  const char *text;
  bool ok;
} ScanCase;

static const ScanCase scan_cases[] = {
  { "quoted '=' and '>' are not attributes",
    "<plan a=\"x=y>z\" b='=>='/>", true },
  { "a comment's tags are not counted", "<!-- <x a=1 b=2> --><plan/>", true },
  { "a CDATA section's tags are not counted", "<plan><![CDATA[<x a=1>]]></plan>", true },
  { "a processing instruction is skipped", "<?xml version=\"1.0\"?><plan/>", true },
  { "end tags and declarations are skipped", "<!DOCTYPE plan><plan></plan>", true },
  { "an unclosed tag at the end is left to the parser", "<plan a=\"1", true },
  { "an unclosed comment at the end is left to the parser", "<plan/><!-- a=", true },
  { "empty input is left to the parser", "", true },
};

/* Builds `n` start tags of `attrs` attributes each. */
static char *
tags_text (long n, long attrs)
{
  char *text = NULL;
  size_t size = 0;
  FILE *f = open_memstream (&text, &size);
  ck_assert_ptr_nonnull (f);
  for (long i = 0; i < n; i++)
    {
      fputs ("<e", f);
      for (long a = 0; a < attrs; a++)
        fprintf (f, " a%ld=\"\"", a);
      fputs ("/>", f);
    }
  fclose (f);
  return text;
}

START_TEST (test_scan_counts)
{
  const ScanCase *c = &scan_cases[_i];
  size_t n = strlen (c->text);
  /* An exact-size copy, so that a read past the end shows under ASan. */
  char *copy = malloc (n ? n : 1);
  ck_assert_ptr_nonnull (copy);
  memcpy (copy, c->text, n);
  HlError err = { 0 };
  ck_assert_msg (hl_plan_scan_ok (copy, n, "scan.hlplan", &err) == c->ok, "%s: %s",
                 c->what, err.message);
  ck_assert_msg (hl_plan_scan_ok (copy, n, NULL, NULL) == c->ok, "%s without err", c->what);
  free (copy);
}
END_TEST

START_TEST (test_scan_limits)
{
  const struct { const char *what; long tags, attrs; bool ok; const char *word; } limits[] = {
    { "attributes on one element at the limit", 1, HL_PLAN_SCAN_MAX_ELEMENT_ATTRIBUTES, true, NULL },
    { "one attribute over", 1, HL_PLAN_SCAN_MAX_ELEMENT_ATTRIBUTES + 1, false, "attributes" },
    { "elements at the limit", HL_PLAN_SCAN_MAX_ELEMENTS, 0, true, NULL },
    { "one element over", HL_PLAN_SCAN_MAX_ELEMENTS + 1, 0, false, "elements" },
    { "attributes in the file at the limit", HL_PLAN_SCAN_MAX_ATTRIBUTES / 60, 60, true, NULL },
    { "attributes in the file over", HL_PLAN_SCAN_MAX_ATTRIBUTES / 60 + 1, 60, false,
      "attributes" },
  };
  for (size_t i = 0; i < sizeof limits / sizeof limits[0]; i++)
    {
      char *text = tags_text (limits[i].tags, limits[i].attrs);
      HlError err = { 0 };
      bool ok = hl_plan_scan_ok (text, strlen (text), "limits.hlplan", &err);
      ck_assert_msg (ok == limits[i].ok, "%s: %s", limits[i].what, err.message);
      if (!ok)
        {
          ck_assert_int_eq (err.status, HL_ERR_PARSE);
          ck_assert_int_eq (err.line, 1);
          ck_assert_msg (hl_test_contains_ci (err.message, "limits.hlplan: line 1, element <e>")
                         && hl_test_contains_ci (err.message, limits[i].word),
                         "%s: %s", limits[i].what, err.message);
        }
      free (text);
    }
}
END_TEST

static Suite *
hostile_suite (void)
{
  Suite *s = suite_create ("hostile");
  TCase *tc = tcase_create ("files");
  tcase_add_loop_test (tc, test_hostile_file, 0, N_CASES);
  tcase_set_timeout (tc, 4 * HL_HOSTILE_KILL_SECONDS);
  suite_add_tcase (s, tc);

  tc = tcase_create ("scan");
  tcase_add_loop_test (tc, test_scan_counts, 0,
                       (int) (sizeof scan_cases / sizeof scan_cases[0]));
  tcase_add_test (tc, test_scan_limits);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  signal (SIGPIPE, SIG_IGN);
  return hl_test_run (hostile_suite ());
}
