/* hl-sha256.c: SHA-256 after NIST FIPS 180-2 (2002), section 6.2.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include "hl-sha256.h"

#define HL_SHA256_BLOCK 64
#define HL_SHA256_LENGTH_FIELD 8   /* bytes of the bit count in the padding */

/* FIPS 180-2 section 4.2.2: the first 32 bits of the fractional parts of
 * the cube roots of the first 64 primes. */
static const uint32_t k[64] = {
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1,
  0x923f82a4, 0xab1c5ed5, 0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3,
  0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174, 0xe49b69c1, 0xefbe4786,
  0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
  0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147,
  0x06ca6351, 0x14292967, 0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13,
  0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85, 0xa2bfe8a1, 0xa81a664b,
  0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
  0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a,
  0x5b9cca4f, 0x682e6ff3, 0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208,
  0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2,
};

/* FIPS 180-2 section 5.3.2: the initial hash value. */
static const uint32_t h0[8] = {
  0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a,
  0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19,
};

static inline uint32_t
rotr (uint32_t x, unsigned n)
{
  return (x >> n) | (x << (32 - n));
}

static void
compress (uint32_t h[8], const uint8_t block[HL_SHA256_BLOCK])
{
  uint32_t w[64];

  for (int t = 0; t < 16; t++)
    w[t] = (uint32_t) block[4 * t] << 24 | (uint32_t) block[4 * t + 1] << 16
           | (uint32_t) block[4 * t + 2] << 8 | (uint32_t) block[4 * t + 3];
  for (int t = 16; t < 64; t++)
    {
      uint32_t s0 = rotr (w[t - 15], 7) ^ rotr (w[t - 15], 18) ^ (w[t - 15] >> 3);
      uint32_t s1 = rotr (w[t - 2], 17) ^ rotr (w[t - 2], 19) ^ (w[t - 2] >> 10);
      w[t] = w[t - 16] + s0 + w[t - 7] + s1;
    }

  uint32_t a = h[0], b = h[1], c = h[2], d = h[3];
  uint32_t e = h[4], f = h[5], g = h[6], hh = h[7];

  for (int t = 0; t < 64; t++)
    {
      uint32_t s1 = rotr (e, 6) ^ rotr (e, 11) ^ rotr (e, 25);
      uint32_t ch = (e & f) ^ (~e & g);
      uint32_t t1 = hh + s1 + ch + k[t] + w[t];
      uint32_t s0 = rotr (a, 2) ^ rotr (a, 13) ^ rotr (a, 22);
      uint32_t maj = (a & b) ^ (a & c) ^ (b & c);
      uint32_t t2 = s0 + maj;
      hh = g;
      g = f;
      f = e;
      e = d + t1;
      d = c;
      c = b;
      b = a;
      a = t1 + t2;
    }

  h[0] += a;
  h[1] += b;
  h[2] += c;
  h[3] += d;
  h[4] += e;
  h[5] += f;
  h[6] += g;
  h[7] += hh;
}

void
hl_sha256_init (HlSha256 *ctx)
{
  memcpy (ctx->h, h0, sizeof ctx->h);
  ctx->n_bytes = 0;
  ctx->block_len = 0;
}

void
hl_sha256_update (HlSha256 *ctx, const void *data, size_t size)
{
  const uint8_t *p = data;

  ctx->n_bytes += size;
  while (size > 0)
    {
      size_t take = HL_SHA256_BLOCK - ctx->block_len;
      if (take > size)
        take = size;
      memcpy (ctx->block + ctx->block_len, p, take);
      ctx->block_len += take;
      p += take;
      size -= take;
      if (ctx->block_len == HL_SHA256_BLOCK)
        {
          compress (ctx->h, ctx->block);
          ctx->block_len = 0;
        }
    }
}

void
hl_sha256_final (HlSha256 *ctx, uint8_t digest[HL_SHA256_SIZE])
{
  uint64_t bits = ctx->n_bytes * 8u;

  /* Padding (FIPS 180-2 section 5.1.1): a 1 bit, zeros, the 64-bit length. */
  ctx->block[ctx->block_len++] = 0x80;
  if (ctx->block_len > HL_SHA256_BLOCK - HL_SHA256_LENGTH_FIELD)
    {
      memset (ctx->block + ctx->block_len, 0, HL_SHA256_BLOCK - ctx->block_len);
      compress (ctx->h, ctx->block);
      ctx->block_len = 0;
    }
  memset (ctx->block + ctx->block_len, 0,
          HL_SHA256_BLOCK - HL_SHA256_LENGTH_FIELD - ctx->block_len);
  for (int i = 0; i < HL_SHA256_LENGTH_FIELD; i++)
    ctx->block[HL_SHA256_BLOCK - 1 - i] = (uint8_t) (bits >> (8 * i));
  compress (ctx->h, ctx->block);

  for (int i = 0; i < 8; i++)
    {
      digest[4 * i] = (uint8_t) (ctx->h[i] >> 24);
      digest[4 * i + 1] = (uint8_t) (ctx->h[i] >> 16);
      digest[4 * i + 2] = (uint8_t) (ctx->h[i] >> 8);
      digest[4 * i + 3] = (uint8_t) ctx->h[i];
    }
  memset (ctx, 0, sizeof *ctx);
}

void
hl_sha256 (const void *data, size_t size, uint8_t digest[HL_SHA256_SIZE])
{
  HlSha256 ctx;

  hl_sha256_init (&ctx);
  hl_sha256_update (&ctx, data, size);
  hl_sha256_final (&ctx, digest);
}

char *
hl_sha256_hex (const void *data, size_t size, char hex[HL_SHA256_HEX_SIZE])
{
  static const char digits[] = "0123456789abcdef";
  uint8_t digest[HL_SHA256_SIZE];

  hl_sha256 (data, size, digest);
  for (int i = 0; i < HL_SHA256_SIZE; i++)
    {
      hex[2 * i] = digits[digest[i] >> 4];
      hex[2 * i + 1] = digits[digest[i] & 0x0f];
    }
  hex[2 * HL_SHA256_SIZE] = '\0';
  return hex;
}
