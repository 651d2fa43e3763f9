/* test-sha256.c: the SHA-256 digest against published test vectors.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-sha256.h"
#include "hl-test-util.h"

#define HL_MILLION 1000000u
#define HL_CHUNK_MAX 97   /* odd chunk sizes cross block boundaries unevenly */

typedef struct {
  const char *what;
  const char *message;    /* NULL: one million 'a' */
  const char *digest;
} HlShaVector;

/* NIST FIPS 180-2 (2002), Secure Hash Standard, appendix B.1, B.2 and B.3:
 * the SHA-256 examples "abc", the 448-bit message and one million 'a'. */
static const HlShaVector fips_vectors[] = {
  { "FIPS 180-2 B.1, \"abc\"", "abc",
    "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad" },
  { "FIPS 180-2 B.2, 448-bit message",
    "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq",
    "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1" },
  { "FIPS 180-2 B.3, one million 'a'", NULL,
    "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0" },
};

/* Lengths around the 55/56 and 64-byte padding boundaries of the
 * alphabet repeated ("abc...zabc..."); expected digests from GNU coreutils
 * 9.1 sha256sum, an independent implementation. */
typedef struct {
  size_t length;
  const char *digest;
} HlShaBoundary;

static const HlShaBoundary boundaries[] = {
  { 0, "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855" },
  { 55, "595615dbe4f0f407ae397d08b4c2cb870cb9b0e11937416f950c5160acf9c005" },
  { 56, "784f623b787495078e93ff28a25b581df0584055a7e71d8cd90c454716b92f51" },
  { 63, "5ca3e1ef5207490eac01a795e5cc94d59582a5118bf9534665c8668d87aa647c" },
  { 64, "2fcd5a0d60e4c941381fcc4e00a4bf8be422c3ddfafb93c809e8d1e2bfffae8e" },
  { 65, "1b3cd1877ab2f2f19f7be001722554f336cb799df0329de0bb4c118dc6abc06d" },
  { 119, "faef67da856d6fd9c8d12f9ed0a4fefd3cf0ce085ab43e2907418d457e3c354b" },
  { 120, "c9512b08619c19fbb503c7da6b46ef20301e5f7a7a5f43989182398536f5c5c8" },
};

static void
to_hex (const uint8_t digest[HL_SHA256_SIZE], char hex[HL_SHA256_HEX_SIZE])
{
  for (int i = 0; i < HL_SHA256_SIZE; i++)
    snprintf (hex + 2 * i, 3, "%02x", digest[i]);
}

START_TEST (test_fips_vector)
{
  const HlShaVector *v = &fips_vectors[_i];
  char hex[HL_SHA256_HEX_SIZE];

  if (v->message != NULL)
    hl_sha256_hex (v->message, strlen (v->message), hex);
  else
    {
      char *a = malloc (HL_MILLION);
      ck_assert_ptr_nonnull (a);
      memset (a, 'a', HL_MILLION);
      hl_sha256_hex (a, HL_MILLION, hex);
      free (a);
    }
  ck_assert_msg (strcmp (hex, v->digest) == 0, "%s: got %s, expected %s", v->what,
                 hex, v->digest);
}
END_TEST

START_TEST (test_fips_vector_incremental)
{
  const HlShaVector *v = &fips_vectors[_i];
  HlSha256 ctx;
  uint8_t digest[HL_SHA256_SIZE];
  char hex[HL_SHA256_HEX_SIZE];

  hl_sha256_init (&ctx);
  if (v->message != NULL)
    for (const char *p = v->message; *p != '\0'; p++)
      hl_sha256_update (&ctx, p, 1);
  else
    {
      char block[1000];
      memset (block, 'a', sizeof block);
      for (unsigned i = 0; i < HL_MILLION / sizeof block; i++)
        hl_sha256_update (&ctx, block, sizeof block);
    }
  hl_sha256_final (&ctx, digest);
  to_hex (digest, hex);
  ck_assert_msg (strcmp (hex, v->digest) == 0, "%s byte by byte: got %s", v->what, hex);
}
END_TEST

START_TEST (test_padding_boundary)
{
  const HlShaBoundary *b = &boundaries[_i];
  char text[128];
  char hex[HL_SHA256_HEX_SIZE];

  for (size_t i = 0; i < b->length; i++)
    text[i] = (char) ('a' + i % 26);
  hl_sha256_hex (text, b->length, hex);
  ck_assert_msg (strcmp (hex, b->digest) == 0, "length %zu: got %s, expected %s",
                 b->length, hex, b->digest);
}
END_TEST

/* Any split of the input into updates gives the one-shot digest. */
START_TEST (test_chunking)
{
  uint8_t data[1024];
  uint32_t state = 0x2385u;   /* fixed seed */
  for (size_t i = 0; i < sizeof data; i++)
    {
      state = state * 1664525u + 1013904223u;
      data[i] = (uint8_t) (state >> 24);
    }
  uint8_t expect[HL_SHA256_SIZE];
  hl_sha256 (data, sizeof data, expect);

  for (size_t chunk = 1; chunk <= HL_CHUNK_MAX; chunk++)
    {
      HlSha256 ctx;
      uint8_t got[HL_SHA256_SIZE];
      hl_sha256_init (&ctx);
      for (size_t at = 0; at < sizeof data; at += chunk)
        hl_sha256_update (&ctx, data + at, at + chunk <= sizeof data ? chunk : sizeof data - at);
      hl_sha256_final (&ctx, got);
      ck_assert_msg (memcmp (got, expect, sizeof got) == 0, "chunks of %zu bytes differ", chunk);
    }
}
END_TEST

START_TEST (test_hex_form)
{
  char hex[HL_SHA256_HEX_SIZE];
  ck_assert_ptr_eq (hl_sha256_hex ("x", 1, hex), hex);
  ck_assert_uint_eq (strlen (hex), 2 * HL_SHA256_SIZE);
  for (int i = 0; i < 2 * HL_SHA256_SIZE; i++)
    ck_assert_msg ((hex[i] >= '0' && hex[i] <= '9') || (hex[i] >= 'a' && hex[i] <= 'f'),
                   "character %d of %s is not lower-case hex", i, hex);
}
END_TEST

static Suite *
sha256_suite (void)
{
  Suite *s = suite_create ("sha256");
  TCase *tc = tcase_create ("fips-180-2");
  tcase_add_loop_test (tc, test_fips_vector, 0,
                       (int) (sizeof fips_vectors / sizeof fips_vectors[0]));
  tcase_add_loop_test (tc, test_fips_vector_incremental, 0,
                       (int) (sizeof fips_vectors / sizeof fips_vectors[0]));
  suite_add_tcase (s, tc);

  tc = tcase_create ("padding");
  tcase_add_loop_test (tc, test_padding_boundary, 0,
                       (int) (sizeof boundaries / sizeof boundaries[0]));
  tcase_add_test (tc, test_chunking);
  tcase_add_test (tc, test_hex_form);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  return hl_test_run (sha256_suite ());
}
