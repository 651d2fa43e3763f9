/* hl-gray-image.c: the image entry point, PNG, TIFF and JPEG in 16-bit grey,
 * the window from the histogram and the calibration precedence.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <setjmp.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <jpeglib.h>
#include <png.h>
#include <tiffio.h>

#include "hl-gray-image.h"
#include "hl-i18n.h"
#include "hl-image-ref.h"

#define SNIFF_BYTES 132
#define DICOM_MAGIC_OFFSET 128
#define HISTOGRAM_BINS 65536
#define AUTO_WINDOW_LOW 0.005    /* percentiles of the automatic window */
#define AUTO_WINDOW_HIGH 0.995
#define PNG_CHUNK_MAX_BYTES (8 * 1024 * 1024)
#define JPEG_SCANS_MAX 1000      /* a progressive JPEG with more is refused */
#define JPEG_MEMORY_MAX (1024L * 1024 * 1024)
/* ITU-R BT.601 luma weights for colour to grey (common practice). */
#define LUMA_R 0.299
#define LUMA_G 0.587
#define LUMA_B 0.114

/* ---- Allocation and checks ---------------------------------------------- */

HlGrayImage *
hl_gray_image_alloc (HlImageFormat f, int w, int h)
{
  HlGrayImage *img = calloc (1, sizeof *img);
  if (img == NULL)
    return NULL;
  img->pixels = malloc ((size_t) w * (size_t) h * sizeof *img->pixels);
  if (img->pixels == NULL)
    {
      free (img);
      return NULL;
    }
  img->format = f;
  img->width = w;
  img->height = h;
  img->value_scale = 1.0;
  img->frames = 1;
  return img;
}

void
hl_gray_image_free (HlGrayImage *img)
{
  if (img == NULL)
    return;
  free (img->pixels);
  free (img);
}

HlStatus
hl_gray_image_check_size (const char *path, long long w, long long h, HlError *err)
{
  if (w <= 0 || h <= 0)
    return hl_error_set (err, HL_ERR_PARSE, path,
                         _("The image \"%s\" is %lld x %lld pixels: it has no pixels"),
                         path, w, h);
  if (w > HL_GRAY_IMAGE_MAX_SIDE || h > HL_GRAY_IMAGE_MAX_SIDE
      || w * h > HL_GRAY_IMAGE_MAX_PIXELS)
    return hl_error_set (err, HL_ERR_INVALID, path,
                         _("The image \"%s\" is %lld x %lld pixels: more than %lld megapixels "
                           "or %d pixels a side cannot be opened"),
                         path, w, h, HL_GRAY_IMAGE_MAX_PIXELS / 1000000,
                         HL_GRAY_IMAGE_MAX_SIDE);
  return HL_OK;
}

static HlStatus
out_of_memory (const char *path, HlError *err)
{
  return hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory reading \"%s\""), path);
}

static HlStatus
damaged (const char *path, const char *kind, HlError *err)
{
  return hl_error_set (err, HL_ERR_PARSE, path,
                       _("The %s image \"%s\" is truncated or damaged"), kind, path);
}

static inline uint16_t
luma16 (double r, double g, double b)
{
  return (uint16_t) lround (LUMA_R * r + LUMA_G * g + LUMA_B * b);
}

static void
set_colour_note (HlGrayImage *img)
{
  img->colour_converted = true;
  snprintf (img->note, sizeof img->note, "%s", _("The colour image was converted to grey."));
}

/* ---- PNG ---------------------------------------------------------------- */

typedef struct {
  jmp_buf jump;
} PngJump;

static void
png_error_cb (png_structp png, png_const_charp msg)
{
  (void) msg;
  PngJump *j = png_get_error_ptr (png);
  longjmp (j->jump, 1);
}

static void
png_warning_cb (png_structp png, png_const_charp msg)
{
  (void) png;
  (void) msg;
}

static HlStatus
read_png (const char *path, FILE *fp, HlGrayImage **out, HlError *err)
{
  PngJump j;
  png_structp png = png_create_read_struct (PNG_LIBPNG_VER_STRING, &j, png_error_cb,
                                            png_warning_cb);
  if (png == NULL)
    return out_of_memory (path, err);
  png_infop info = png_create_info_struct (png);
  HlGrayImage *volatile img = NULL;
  png_bytep volatile row = NULL;
  if (info == NULL)
    {
      png_destroy_read_struct (&png, NULL, NULL);
      return out_of_memory (path, err);
    }
  if (setjmp (j.jump))
    {
      png_destroy_read_struct (&png, &info, NULL);
      hl_gray_image_free (img);
      free (row);
      return damaged (path, "PNG", err);
    }
  png_set_user_limits (png, HL_GRAY_IMAGE_MAX_SIDE, HL_GRAY_IMAGE_MAX_SIDE);
  png_set_chunk_malloc_max (png, PNG_CHUNK_MAX_BYTES);
  png_init_io (png, fp);
  png_read_info (png, info);
  png_uint_32 w = png_get_image_width (png, info), h = png_get_image_height (png, info);
  HlStatus st = hl_gray_image_check_size (path, w, h, err);
  if (st != HL_OK)
    {
      png_destroy_read_struct (&png, &info, NULL);
      return st;
    }
  int depth = png_get_bit_depth (png, info);
  int type = png_get_color_type (png, info);
  png_set_expand (png);           /* palette to RGB, low-bit grey to 8 bits */
  png_set_strip_alpha (png);
  if (png_get_interlace_type (png, info) != PNG_INTERLACE_NONE)
    {
      png_destroy_read_struct (&png, &info, NULL);
      return hl_error_set (err, HL_ERR_PARSE, path,
                           _("The PNG image \"%s\" is interlaced: save it without "
                             "interlacing"), path);
    }
  png_read_update_info (png, info);
  int channels = png_get_channels (png, info);
  int out_depth = png_get_bit_depth (png, info);
  size_t rowbytes = png_get_rowbytes (png, info);
  img = hl_gray_image_alloc (HL_IMAGE_FORMAT_PNG, (int) w, (int) h);
  row = malloc (rowbytes);
  if (img == NULL || row == NULL)
    {
      png_destroy_read_struct (&png, &info, NULL);
      hl_gray_image_free (img);
      free (row);
      return out_of_memory (path, err);
    }
  for (png_uint_32 y = 0; y < h; y++)
    {
      png_read_row (png, row, NULL);
      uint16_t *dst = img->pixels + (size_t) y * w;
      for (png_uint_32 x = 0; x < w; x++)
        {
          double s[3];
          for (int c = 0; c < channels && c < 3; c++)
            {
              const png_byte *p = row + ((size_t) x * channels + c) * (out_depth / 8);
              s[c] = out_depth == 16 ? (p[0] << 8) | p[1] : p[0];
            }
          dst[x] = channels >= 3 ? luma16 (s[0], s[1], s[2]) : (uint16_t) s[0];
        }
    }
  png_read_end (png, NULL);
  png_destroy_read_struct (&png, &info, NULL);
  free (row);
  img->bits = depth == 16 ? 16 : 8;
  if (type & PNG_COLOR_MASK_COLOR)
    {
      snprintf (img->photometric, sizeof img->photometric, "RGB");
      set_colour_note (img);
    }
  else
    snprintf (img->photometric, sizeof img->photometric, "MONOCHROME2");
  *out = img;
  return HL_OK;
}

/* ---- TIFF --------------------------------------------------------------- */

static void
tiff_quiet (const char *module, const char *fmt, va_list ap)
{
  (void) module;
  (void) fmt;
  (void) ap;
}

static HlStatus
read_tiff (const char *path, HlGrayImage **out, HlError *err)
{
  TIFFSetErrorHandler (tiff_quiet);
  TIFFSetWarningHandler (tiff_quiet);
  TIFF *tif = TIFFOpen (path, "r");
  if (tif == NULL)
    return damaged (path, "TIFF", err);
  uint32_t w = 0, h = 0;
  uint16_t bps = 1, spp = 1, photo = PHOTOMETRIC_MINISBLACK, planar = PLANARCONFIG_CONTIG;
  TIFFGetField (tif, TIFFTAG_IMAGEWIDTH, &w);
  TIFFGetField (tif, TIFFTAG_IMAGELENGTH, &h);
  TIFFGetFieldDefaulted (tif, TIFFTAG_BITSPERSAMPLE, &bps);
  TIFFGetFieldDefaulted (tif, TIFFTAG_SAMPLESPERPIXEL, &spp);
  TIFFGetFieldDefaulted (tif, TIFFTAG_PLANARCONFIG, &planar);
  if (!TIFFGetField (tif, TIFFTAG_PHOTOMETRIC, &photo))
    photo = PHOTOMETRIC_MINISBLACK;
  HlStatus st = hl_gray_image_check_size (path, w, h, err);
  if (st != HL_OK)
    {
      TIFFClose (tif);
      return st;
    }
  HlGrayImage *img = hl_gray_image_alloc (HL_IMAGE_FORMAT_TIFF, (int) w, (int) h);
  if (img == NULL)
    {
      TIFFClose (tif);
      return out_of_memory (path, err);
    }
  bool grey = photo == PHOTOMETRIC_MINISBLACK || photo == PHOTOMETRIC_MINISWHITE;
  bool direct = !TIFFIsTiled (tif) && planar == PLANARCONFIG_CONTIG
                && (bps == 8 || bps == 16)
                && ((grey && spp >= 1) || (photo == PHOTOMETRIC_RGB && spp >= 3));
  if (direct)
    {
      tmsize_t sl = TIFFScanlineSize (tif);
      if (sl < (tmsize_t) ((size_t) w * spp * (bps / 8)))
        {
          hl_gray_image_free (img);
          TIFFClose (tif);
          return damaged (path, "TIFF", err);
        }
      unsigned char *line = malloc ((size_t) sl);
      if (line == NULL)
        {
          hl_gray_image_free (img);
          TIFFClose (tif);
          return out_of_memory (path, err);
        }
      for (uint32_t y = 0; y < h; y++)
        {
          if (TIFFReadScanline (tif, line, y, 0) < 0)
            {
              free (line);
              hl_gray_image_free (img);
              TIFFClose (tif);
              return damaged (path, "TIFF", err);
            }
          uint16_t *dst = img->pixels + (size_t) y * w;
          for (uint32_t x = 0; x < w; x++)
            {
              double s[3] = { 0, 0, 0 };
              for (int c = 0; c < (grey ? 1 : 3); c++)
                {
                  size_t i = (size_t) x * spp + c;
                  s[c] = bps == 16 ? ((const uint16_t *) line)[i] : line[i];
                }
              dst[x] = grey ? (uint16_t) s[0] : luma16 (s[0], s[1], s[2]);
              if (photo == PHOTOMETRIC_MINISWHITE)
                dst[x] = (uint16_t) ((bps == 16 ? 65535 : 255) - dst[x]);
            }
        }
      free (line);
      img->bits = bps;
      img->turned_over = photo == PHOTOMETRIC_MINISWHITE;
    }
  else
    {
      /* Tiles, palettes, YCbCr, 1-bit and the rest: libtiff's 8-bit RGBA. */
      uint32_t *rgba = malloc ((size_t) w * h * sizeof *rgba);
      if (rgba == NULL)
        {
          hl_gray_image_free (img);
          TIFFClose (tif);
          return out_of_memory (path, err);
        }
      if (!TIFFReadRGBAImageOriented (tif, w, h, rgba, ORIENTATION_TOPLEFT, 0))
        {
          free (rgba);
          hl_gray_image_free (img);
          TIFFClose (tif);
          return damaged (path, "TIFF", err);
        }
      for (size_t i = 0; i < (size_t) w * h; i++)
        img->pixels[i] = luma16 (TIFFGetR (rgba[i]), TIFFGetG (rgba[i]), TIFFGetB (rgba[i]));
      free (rgba);
      img->bits = 8;
    }
  TIFFClose (tif);
  if (grey)
    snprintf (img->photometric, sizeof img->photometric, "%s",
              photo == PHOTOMETRIC_MINISWHITE ? "MONOCHROME1" : "MONOCHROME2");
  else
    {
      snprintf (img->photometric, sizeof img->photometric, "RGB");
      set_colour_note (img);
    }
  *out = img;
  return HL_OK;
}

/* ---- JPEG --------------------------------------------------------------- */

typedef struct {
  struct jpeg_error_mgr mgr;
  jmp_buf jump;
} JpegError;

static void
jpeg_error_exit_cb (j_common_ptr cinfo)
{
  JpegError *e = (JpegError *) cinfo->err;
  longjmp (e->jump, 1);
}

static void
jpeg_message_cb (j_common_ptr cinfo, int level)
{
  (void) cinfo;
  (void) level;
}

static void
jpeg_progress_cb (j_common_ptr cinfo)
{
  j_decompress_ptr d = (j_decompress_ptr) cinfo;
  if (d->input_scan_number > JPEG_SCANS_MAX)
    jpeg_error_exit_cb (cinfo);
}

static HlStatus
read_jpeg (const char *path, FILE *fp, HlGrayImage **out, HlError *err)
{
  struct jpeg_decompress_struct cinfo;
  JpegError jerr;
  struct jpeg_progress_mgr progress = { .progress_monitor = jpeg_progress_cb };
  HlGrayImage *volatile img = NULL;
  cinfo.err = jpeg_std_error (&jerr.mgr);
  jerr.mgr.error_exit = jpeg_error_exit_cb;
  jerr.mgr.emit_message = jpeg_message_cb;
  if (setjmp (jerr.jump))
    {
      jpeg_destroy_decompress (&cinfo);
      hl_gray_image_free (img);
      return damaged (path, "JPEG", err);
    }
  jpeg_create_decompress (&cinfo);
  cinfo.progress = &progress;
  cinfo.mem->max_memory_to_use = JPEG_MEMORY_MAX;
  jpeg_stdio_src (&cinfo, fp);
  jpeg_read_header (&cinfo, TRUE);
  HlStatus st = hl_gray_image_check_size (path, cinfo.image_width, cinfo.image_height, err);
  if (st != HL_OK)
    {
      jpeg_destroy_decompress (&cinfo);
      return st;
    }
  if (cinfo.jpeg_color_space == JCS_CMYK || cinfo.jpeg_color_space == JCS_YCCK)
    {
      jpeg_destroy_decompress (&cinfo);
      return hl_error_set (err, HL_ERR_PARSE, path,
                           _("The JPEG image \"%s\" is in CMYK colour, which is not read"),
                           path);
    }
  bool colour = cinfo.num_components > 1;
  cinfo.out_color_space = JCS_GRAYSCALE;   /* the luma of a colour image */
  jpeg_start_decompress (&cinfo);
  img = hl_gray_image_alloc (HL_IMAGE_FORMAT_JPEG, (int) cinfo.output_width,
                             (int) cinfo.output_height);
  if (img == NULL)
    {
      jpeg_destroy_decompress (&cinfo);
      return out_of_memory (path, err);
    }
  JSAMPLE line[HL_GRAY_IMAGE_MAX_SIDE];
  while (cinfo.output_scanline < cinfo.output_height)
    {
      JSAMPROW rows[1] = { line };
      JDIMENSION y = cinfo.output_scanline;
      if (jpeg_read_scanlines (&cinfo, rows, 1) != 1)
        longjmp (jerr.jump, 1);
      uint16_t *dst = img->pixels + (size_t) y * img->width;
      for (int x = 0; x < img->width; x++)
        dst[x] = line[x];
    }
  jpeg_finish_decompress (&cinfo);
  jpeg_destroy_decompress (&cinfo);
  img->bits = 8;
  if (colour)
    {
      snprintf (img->photometric, sizeof img->photometric, "RGB");
      set_colour_note (img);
    }
  else
    snprintf (img->photometric, sizeof img->photometric, "MONOCHROME2");
  *out = img;
  return HL_OK;
}

/* ---- DICOM: element lengths checked before GDCM ------------------------- */

/* GDCM allocates an element's declared length before it reads the value
 * (found by fuzzing: one changed byte of a VR made it ask for 800 MB for a
 * 1 kB file).  Top-level elements with a defined length are walked here
 * first: one with an unknown VR, or one that claims more bytes than the
 * file has left, is refused.
 * Items of an element of undefined length are walked too while they have
 * defined lengths (the fragments of compressed pixel data); the walk stops
 * at an item of undefined length (a nested data set), which GDCM then
 * reads unchecked, and does not cover big-endian files. */
#define DICOM_WALK_MAX_ELEMENTS 100000
#define DICOM_UNDEFINED_LENGTH 0xffffffffu

static bool
pread_all (int fd, void *buf, size_t n, off_t at)
{
  size_t got = 0;
  while (got < n)
    {
      ssize_t r = pread (fd, (char *) buf + got, n - got, at + (off_t) got);
      if (r < 0 && errno == EINTR)
        continue;
      if (r <= 0)
        return false;
      got += (size_t) r;
    }
  return true;
}

static bool
long_vr (const unsigned char vr[2])
{
  static const char *const vrs[] = { "OB", "OD", "OF", "OL", "OV", "OW", "SQ", "SV", "UC",
                                     "UN", "UR", "UT", "UV" };
  for (size_t i = 0; i < sizeof vrs / sizeof *vrs; i++)
    if (vr[0] == vrs[i][0] && vr[1] == vrs[i][1])
      return true;
  return false;
}

/* The value representations of DICOM PS3.5 section 6.2. */
static bool
known_vr (const unsigned char vr[2])
{
  static const char vrs[] = "AEASATCSDADSDTFLFDISLOLTOBODOFOLOVOWPNSHSLSQSSSTSVTMUCUIULUNURUSUTUV";
  for (size_t i = 0; i + 1 < sizeof vrs; i += 2)
    if (vr[0] == (unsigned char) vrs[i] && vr[1] == (unsigned char) vrs[i + 1])
      return true;
  return false;
}

static HlStatus
dicom_prescan (int fd, off_t size, const char *path, HlError *err)
{
  off_t at = DICOM_MAGIC_OFFSET + 4;
  bool implicit = false, in_meta = true;
  char ts[68] = "";
  for (int n = 0; n < DICOM_WALK_MAX_ELEMENTS && at + 8 <= size; n++)
    {
      unsigned char h[12];
      if (!pread_all (fd, h, 8, at))
        break;
      unsigned group = h[0] | (h[1] << 8), elem = h[2] | (h[3] << 8);
      /* PS3.10: the file meta information (group 0002) follows "DICM";
       * without it GDCM guesses the encoding and can allocate a length
       * of 2 GB (a fuzz finding). */
      if (n == 0 && group != 0x0002)
        return hl_error_set (err, HL_ERR_PARSE, path,
                             _("The DICOM file \"%s\" cannot be opened: it has no file meta "
                               "information after its preamble (damaged)"), path);
      if (in_meta && group != 0x0002)
        {
          in_meta = false;
          if (strncmp (ts, "1.2.840.10008.1.2.2", 19) == 0)
            return HL_OK;                         /* big endian: not walked */
          implicit = strcmp (ts, "1.2.840.10008.1.2") == 0;
        }
      /* GDCM reads an element with an unknown VR (found by fuzzing: one
       * changed byte) with a 4-byte length it then allocates. */
      if (!(implicit && !in_meta) && !known_vr (h + 4))
        return hl_error_set (err, HL_ERR_PARSE, path,
                             _("The DICOM file \"%s\" cannot be opened: its element "
                               "(%04X,%04X) has no known value representation (damaged)"),
                             path, group, elem);
      uint32_t len;
      off_t head;
      if (implicit && !in_meta)
        {
          len = (uint32_t) h[4] | ((uint32_t) h[5] << 8) | ((uint32_t) h[6] << 16)
                | ((uint32_t) h[7] << 24);
          head = 8;
        }
      else if (long_vr (h + 4))
        {
          if (at + 12 > size || !pread_all (fd, h, 12, at))
            return hl_error_set (err, HL_ERR_PARSE, path,
                                 _("The DICOM file \"%s\" cannot be opened: it ends in the "
                                   "middle of an element (truncated or damaged)"), path);
          len = (uint32_t) h[8] | ((uint32_t) h[9] << 8) | ((uint32_t) h[10] << 16)
                | ((uint32_t) h[11] << 24);
          head = 12;
        }
      else
        {
          len = h[6] | (h[7] << 8);
          head = 8;
        }
      /* Undefined length: sequences, UN, and the pixel data (encapsulated)
       * only; GDCM asserts on any other (a third fuzz finding: the
       * program aborted). */
      if (len == DICOM_UNDEFINED_LENGTH && !(implicit && !in_meta)
          && !(h[4] == 'S' && h[5] == 'Q') && !(h[4] == 'U' && h[5] == 'N')
          && !(group == 0x7fe0 && elem == 0x0010 && h[4] == 'O'
               && (h[5] == 'B' || h[5] == 'W')))
        return hl_error_set (err, HL_ERR_PARSE, path,
                             _("The DICOM file \"%s\" cannot be opened: its element "
                               "(%04X,%04X) has an undefined length its kind cannot have "
                               "(damaged)"), path, group, elem);
      if (len == DICOM_UNDEFINED_LENGTH)
        {
          /* Items of defined length (the fragments of compressed pixel
           * data) up to the delimiter; an item of undefined length (a
           * nested data set) ends the walk. */
          at += head;
          for (;;)
            {
              unsigned char it[8];
              if (at + 8 > size || !pread_all (fd, it, 8, at))
                return HL_OK;
              unsigned ig = it[0] | (it[1] << 8), ie = it[2] | (it[3] << 8);
              uint32_t il = (uint32_t) it[4] | ((uint32_t) it[5] << 8)
                            | ((uint32_t) it[6] << 16) | ((uint32_t) it[7] << 24);
              if (il == DICOM_UNDEFINED_LENGTH && ig == 0xfffe && ie == 0xe000)
                return HL_OK;
              if (ig != 0xfffe || (ie != 0xe000 && ie != 0xe0dd))
                return hl_error_set (err, HL_ERR_PARSE, path,
                                     _("The DICOM file \"%s\" cannot be opened: its element "
                                       "(%04X,%04X) is not closed (truncated or damaged)"),
                                     path, group, elem);
              if ((off_t) il > size - at - 8)
                return hl_error_set (err, HL_ERR_PARSE, path,
                                     _("The DICOM file \"%s\" cannot be opened: an item of "
                                       "its element (%04X,%04X) claims %lu bytes, more than "
                                       "the file has left (truncated or damaged)"),
                                     path, group, elem, (unsigned long) il);
              at += 8 + (off_t) il;
              if (ie == 0xe0dd)
                break;
            }
          continue;
        }
      if ((off_t) len > size - at - head)
        return hl_error_set (err, HL_ERR_PARSE, path,
                             _("The DICOM file \"%s\" cannot be opened: its element "
                               "(%04X,%04X) claims %lu bytes, more than the file has left "
                               "(truncated or damaged)"),
                             path, group, elem, (unsigned long) len);
      if (in_meta && group == 0x0002 && elem == 0x0010 && len < sizeof ts
          && pread_all (fd, ts, len, at + head))
        {
          size_t k = len;
          ts[k] = '\0';
          while (k > 0 && (ts[k - 1] == '\0' || ts[k - 1] == ' '))
            ts[--k] = '\0';
        }
      at += head + (off_t) len;
    }
  /* A few bytes after the last element: GDCM asserts on a partial element
   * (a fourth fuzz finding: the program aborted). */
  if (at < size && size - at < 8)
    return hl_error_set (err, HL_ERR_PARSE, path,
                         _("The DICOM file \"%s\" cannot be opened: it ends in the middle "
                           "of an element (truncated or damaged)"), path);
  return HL_OK;
}

/* ---- The entry point ---------------------------------------------------- */

const char *
hl_image_format_name (HlImageFormat f)
{
  switch (f)
    {
    case HL_IMAGE_FORMAT_DICOM: return "dicom";
    case HL_IMAGE_FORMAT_PNG: return "png";
    case HL_IMAGE_FORMAT_TIFF: return "tiff";
    case HL_IMAGE_FORMAT_JPEG: return "jpeg";
    }
  return "unknown";
}

bool
hl_image_format_sniff (const unsigned char *head, size_t n, HlImageFormat *out)
{
  static const unsigned char png_sig[8] = { 0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n' };
  if (n >= DICOM_MAGIC_OFFSET + 4 && memcmp (head + DICOM_MAGIC_OFFSET, "DICM", 4) == 0)
    *out = HL_IMAGE_FORMAT_DICOM;
  else if (n >= 8 && memcmp (head, png_sig, 8) == 0)
    *out = HL_IMAGE_FORMAT_PNG;
  else if (n >= 4 && (memcmp (head, "II*\0", 4) == 0 || memcmp (head, "MM\0*", 4) == 0))
    *out = HL_IMAGE_FORMAT_TIFF;
  else if (n >= 3 && head[0] == 0xff && head[1] == 0xd8 && head[2] == 0xff)
    *out = HL_IMAGE_FORMAT_JPEG;
  else
    return false;
  return true;
}

HlGrayImage *
hl_gray_image_load (const char *path, HlError *err)
{
  int fd = open (path, O_RDONLY | O_CLOEXEC | O_NOCTTY);
  if (fd < 0)
    {
      if (errno == ENOENT || errno == ENOTDIR)
        hl_error_set (err, HL_ERR_IO, path,
                      _("The image \"%s\" is not there: it has been moved or deleted"), path);
      else
        hl_error_set (err, HL_ERR_IO, path, _("Cannot read the image \"%s\": %s"), path,
                      strerror (errno));
      return NULL;
    }
  struct stat sb;
  if (fstat (fd, &sb) != 0 || !S_ISREG (sb.st_mode))
    {
      close (fd);
      hl_error_set (err, HL_ERR_IO, path, _("\"%s\" is not a regular file"), path);
      return NULL;
    }
  if ((long long) sb.st_size > HL_GRAY_IMAGE_MAX_FILE_BYTES)
    {
      close (fd);
      hl_error_set (err, HL_ERR_IO, path,
                    _("The image \"%s\" is %lld MB: files over %lld MB are not opened"), path,
                    (long long) sb.st_size / (1024 * 1024),
                    HL_GRAY_IMAGE_MAX_FILE_BYTES / (1024 * 1024));
      return NULL;
    }
  unsigned char head[SNIFF_BYTES];
  ssize_t got = 0;
  while (got < SNIFF_BYTES)
    {
      ssize_t r = read (fd, head + got, SNIFF_BYTES - (size_t) got);
      if (r < 0 && errno == EINTR)
        continue;
      if (r <= 0)
        break;
      got += r;
    }
  HlImageFormat format;
  if (!hl_image_format_sniff (head, (size_t) got, &format))
    {
      close (fd);
      hl_error_set (err, HL_ERR_PARSE, path,
                    _("\"%s\" is not a DICOM, PNG, TIFF or JPEG image"), path);
      return NULL;
    }
  HlGrayImage *img = NULL;
  HlStatus st = HL_OK;
  if (format == HL_IMAGE_FORMAT_DICOM
      && dicom_prescan (fd, sb.st_size, path, err) != HL_OK)
    {
      close (fd);
      return NULL;
    }
  if (format == HL_IMAGE_FORMAT_DICOM || format == HL_IMAGE_FORMAT_TIFF)
    {
      close (fd);
      st = format == HL_IMAGE_FORMAT_DICOM ? hl_dicom_read (path, &img, err)
                                           : read_tiff (path, &img, err);
    }
  else
    {
      if (lseek (fd, 0, SEEK_SET) != 0)
        {
          close (fd);
          hl_error_set (err, HL_ERR_IO, path, _("Cannot read the image \"%s\": %s"), path,
                        strerror (errno));
          return NULL;
        }
      FILE *fp = fdopen (fd, "rb");
      if (fp == NULL)
        {
          close (fd);
          hl_error_set (err, HL_ERR_IO, path, _("Cannot read the image \"%s\": %s"), path,
                        strerror (errno));
          return NULL;
        }
      st = format == HL_IMAGE_FORMAT_PNG ? read_png (path, fp, &img, err)
                                         : read_jpeg (path, fp, &img, err);
      fclose (fp);
    }
  if (st != HL_OK)
    return NULL;
  /* The calibration must be usable when the file gives one. */
  HlSpacingChoice choice;
  HlError cerr = { 0 };
  if (hl_spacing_choose (&img->spacing, &choice, &cerr) != HL_OK)
    {
      hl_error_set (err, cerr.status, path, _("The image \"%s\": %s"), path, cerr.message);
      hl_gray_image_free (img);
      return NULL;
    }
  return img;
}

/* ---- Window ------------------------------------------------------------- */

void
hl_gray_image_auto_window (const HlGrayImage *img, double *centre, double *width)
{
  uint32_t *hist = calloc (HISTOGRAM_BINS, sizeof *hist);
  size_t n = (size_t) img->width * img->height;
  if (hist == NULL || n == 0)
    {
      free (hist);
      *centre = 32767.5;
      *width = 65535.0;
      return;
    }
  for (size_t i = 0; i < n; i++)
    hist[img->pixels[i]]++;
  size_t lo_count = (size_t) floor (AUTO_WINDOW_LOW * (double) n);
  size_t hi_count = (size_t) ceil (AUTO_WINDOW_HIGH * (double) n);
  size_t cum = 0;
  int lo = -1, hi = 0;
  for (int v = 0; v < HISTOGRAM_BINS; v++)
    {
      cum += hist[v];
      if (lo < 0 && cum > lo_count)
        lo = v;
      if (cum >= hi_count)
        {
          hi = v;
          break;
        }
    }
  free (hist);
  if (lo < 0)
    lo = 0;
  double w = (double) (hi - lo) + 1.0;
  *centre = lo + (w - 1.0) / 2.0;
  *width = w;
}

void
hl_gray_image_default_window (const HlGrayImage *img, double *centre, double *width,
                              bool *from_file)
{
  if (img->has_file_window)
    {
      *centre = img->file_window_centre;
      *width = img->file_window_width;
    }
  else
    hl_gray_image_auto_window (img, centre, width);
  if (from_file != NULL)
    *from_file = img->has_file_window;
}

void
hl_window_from_brightness_contrast (double brightness, double contrast, double top,
                                    double *centre, double *width)
{
  /* Shown value (v / top - 1/2) k + 1/2 + b is the window function of
   * DICOM PS3.3 C.11.2.1.2.1, (v - (c - 1/2)) / (w - 1) + 1/2, with
   * w = top / k + 1 and c = top (1/2 - b / k) + 1/2. */
  double k = contrast > 0.0 ? contrast : 1.0;
  *width = top / k + 1.0;
  *centre = top * (0.5 - brightness / k) + 0.5;
}

/* ---- Calibration -------------------------------------------------------- */

static HlStatus
check_spacing (double s, const char *element, HlError *err)
{
  if (!isfinite (s) || s < HL_PIXEL_SPACING_MIN_MM || s > HL_PIXEL_SPACING_MAX_MM)
    return hl_error_set (err, HL_ERR_INVALID, element,
                         _("%s is %g mm: it must lie between %g and %g mm"), element, s,
                         HL_PIXEL_SPACING_MIN_MM, HL_PIXEL_SPACING_MAX_MM);
  return HL_OK;
}

HlStatus
hl_spacing_choose (const HlFileSpacing *in, HlSpacingChoice *out, HlError *err)
{
  memset (out, 0, sizeof *out);
  out->source = HL_SPACING_NONE;
  out->magnification = 1.0;
  if (in->has_pixel_spacing && in->pixel_spacing_calibrated)
    {
      HlStatus st = check_spacing (in->pixel_spacing_mm, _("Pixel Spacing (0028,0030)"), err);
      if (st != HL_OK)
        return st;
      out->source = HL_SPACING_PIXEL;
      out->detector_spacing_mm = in->pixel_spacing_mm;
      out->mm_per_pixel = in->pixel_spacing_mm;
      return HL_OK;
    }
  double det;
  const char *element;
  if (in->has_imager_spacing)
    {
      det = in->imager_spacing_mm;
      element = _("Imager Pixel Spacing (0018,1164)");
    }
  else if (in->has_pixel_spacing)
    {
      det = in->pixel_spacing_mm;
      element = _("Pixel Spacing (0028,0030)");
    }
  else
    return HL_OK;
  HlStatus st = check_spacing (det, element, err);
  if (st != HL_OK)
    return st;
  double m = HL_MAGNIFICATION_ASSUMED;
  out->source = HL_SPACING_IMAGER_DEFAULT;
  out->assumed = true;
  if (in->has_magnification)
    {
      m = in->magnification;
      if (!isfinite (m) || m < HL_MAGNIFICATION_MIN || m > HL_MAGNIFICATION_MAX)
        return hl_error_set (err, HL_ERR_INVALID,
                             "(0018,1114)",
                             _("the magnification %g of Estimated Radiographic Magnification "
                               "Factor (0018,1114) is refused: it must lie between %g and %g "
                               "(a radiograph is always magnified, and 1.5 is far beyond "
                               "the published range)"),
                             m, HL_MAGNIFICATION_MIN, HL_MAGNIFICATION_MAX);
      out->source = HL_SPACING_IMAGER_ERMF;
      out->assumed = false;
    }
  out->detector_spacing_mm = det;
  out->magnification = m;
  out->mm_per_pixel = det / m;
  return HL_OK;
}

static const char *const source_names[] = {
  [HL_SPACING_NONE] = "none",
  [HL_SPACING_PIXEL] = "pixel-spacing",
  [HL_SPACING_IMAGER_ERMF] = "imager-spacing-ermf",
  [HL_SPACING_IMAGER_DEFAULT] = "imager-spacing-default",
};

static const char *const source_labels[] = {
  [HL_SPACING_NONE] = N_("none in the file"),
  [HL_SPACING_PIXEL] = N_("the file's calibrated pixel spacing"),
  [HL_SPACING_IMAGER_ERMF] = N_("the file's detector spacing and magnification factor"),
  [HL_SPACING_IMAGER_DEFAULT] = N_("the file's detector spacing, magnification 1.20 assumed"),
};

const char *
hl_spacing_source_name (HlSpacingSource s)
{
  return (unsigned) s < sizeof source_names / sizeof *source_names ? source_names[s] : "none";
}

bool
hl_spacing_source_from_name (const char *name, HlSpacingSource *out)
{
  for (size_t i = 0; i < sizeof source_names / sizeof *source_names; i++)
    if (strcmp (name, source_names[i]) == 0)
      {
        *out = (HlSpacingSource) i;
        return true;
      }
  return false;
}

const char *
hl_spacing_source_label (HlSpacingSource s)
{
  return (unsigned) s < sizeof source_labels / sizeof *source_labels
         ? _(source_labels[s]) : _(source_labels[0]);
}
