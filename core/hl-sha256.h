/* hl-sha256.h: SHA-256 message digest (FIPS 180-2), no external library.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Used for the provenance digest of a planning summary: the digest of the
 * serialised plan lets anyone check that a summary belongs to a plan file.
 */
#pragma once

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#define HL_SHA256_SIZE 32                        /* bytes of a digest */
#define HL_SHA256_HEX_SIZE (2 * HL_SHA256_SIZE + 1)  /* hex text with NUL */

/* Incremental state; caller-owned, no allocation. */
typedef struct {
  uint32_t h[8];
  uint64_t n_bytes;       /* message length so far */
  uint8_t block[64];
  size_t block_len;
} HlSha256;

void hl_sha256_init (HlSha256 *ctx);
void hl_sha256_update (HlSha256 *ctx, const void *data, size_t size);
void hl_sha256_final (HlSha256 *ctx, uint8_t digest[HL_SHA256_SIZE]);

/* One-shot digest of `size` bytes. */
void hl_sha256 (const void *data, size_t size, uint8_t digest[HL_SHA256_SIZE]);
/* One-shot digest as 64 lower-case hex digits; returns hex. */
char *hl_sha256_hex (const void *data, size_t size, char hex[HL_SHA256_HEX_SIZE]);

#ifdef __cplusplus
}
#endif
