/* hl-file-write.c: writing output files without harming what is there.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * See hl-file-write.h for the rules.  A symbolic link is resolved once,
 * with realpath(), and everything after works on the resolved name; the
 * checks run again just before the rename, so a path that changed into a
 * pipe or a folder while the bytes were written is refused too.
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hl-file-write.h"
#include "hl-i18n.h"

#define HL_FILE_MODE 0644
/* The old file's read, write and execute bits are kept; its set-user-ID,
 * set-group-ID and sticky bits are not: what we write is data, and a
 * set-ID bit kept over new contents would hand them the old owner's rights. */
#define HL_FILE_PERMISSION_BITS 0777
/* The temporary file: short, so that a name of NAME_MAX bytes still works. */
#define HL_TEMP_NAME ".hlXXXXXX"

/* The process umask without changing it (umask() would, for a moment, for
 * every thread); Linux reports it in /proc/self/status. */
static mode_t
current_umask (void)
{
  FILE *f = fopen ("/proc/self/status", "re");
  if (f != NULL)
    {
      char line[256];
      while (fgets (line, sizeof line, f) != NULL)
        {
          unsigned mask;
          if (sscanf (line, "Umask: %o", &mask) == 1)
            {
              fclose (f);
              return (mode_t) mask;
            }
        }
      fclose (f);
    }
  mode_t mask = umask (022);
  umask (mask);
  return mask;
}

/* What a file of this type is called in a message. */
static const char *
file_kind (mode_t mode)
{
  if (S_ISDIR (mode))
    return _("a folder");
  if (S_ISFIFO (mode))
    return _("a named pipe");
  if (S_ISCHR (mode))
    return _("a character device");
  if (S_ISBLK (mode))
    return _("a block device");
  if (S_ISSOCK (mode))
    return _("a socket");
  return _("not a regular file");
}

/* Resolves path to the name that is really written: path itself, or the
 * target of a link.  *exists says whether a regular file is there (then
 * *old holds its status).  Returns HL_OK with *target malloc'd, or an
 * error naming what is in the way. */
static HlStatus
resolve_output (const char *path, char **target, struct stat *old, bool *exists,
                HlError *err)
{
  struct stat st;

  *target = NULL;
  *exists = false;
  if (path == NULL || path[0] == '\0')
    return hl_error_set (err, HL_ERR_IO, "", "%s", _("Cannot save: the file name is empty"));
  const char *slash = strrchr (path, '/');
  if ((slash != NULL ? slash + 1 : path)[0] == '\0')
    return hl_error_set (err, HL_ERR_IO, path,
                         _("Cannot save \"%s\": the name ends in a slash, it names a "
                           "folder, not a file"), path);

  if (lstat (path, &st) != 0)
    {
      if (errno != ENOENT)
        return hl_error_set (err, HL_ERR_IO, path, _("Cannot save \"%s\": %s"), path,
                             strerror (errno));
      /* A new name: the folder is checked when the temporary file is made. */
      *target = strdup (path);
      return *target != NULL ? HL_OK
             : hl_error_set (err, HL_ERR_NOMEM, path, "%s", _("Out of memory while saving"));
    }

  if (S_ISLNK (st.st_mode))
    {
      char *real = realpath (path, NULL);
      if (real == NULL)
        {
          int e = errno;
          if (e == ENOMEM)
            return hl_error_set (err, HL_ERR_NOMEM, path, "%s",
                                 _("Out of memory while saving"));
          return hl_error_set (err, HL_ERR_IO, path,
                               _("Cannot save \"%s\": it is a link to a file that does "
                                 "not exist or cannot be reached (%s); nothing was "
                                 "written"), path, strerror (e));
        }
      if (stat (real, &st) != 0)
        {
          int e = errno;
          free (real);
          return hl_error_set (err, HL_ERR_IO, path, _("Cannot save \"%s\": %s"), path,
                               strerror (e));
        }
      if (!S_ISREG (st.st_mode))
        {
          free (real);
          return hl_error_set (err, HL_ERR_IO, path,
                               _("Cannot save \"%s\": it is a link to %s, not to a "
                                 "regular file; nothing was written"),
                               path, file_kind (st.st_mode));
        }
      *target = real;
    }
  else if (!S_ISREG (st.st_mode))
    {
      if (S_ISDIR (st.st_mode))
        return hl_error_set (err, HL_ERR_IO, path,
                             _("Cannot save \"%s\": a folder of that name is in the way"),
                             path);
      return hl_error_set (err, HL_ERR_IO, path,
                           _("Cannot save \"%s\": it is %s, not a regular file; only a "
                             "regular file or a new name is written, and it was left "
                             "as it is"), path, file_kind (st.st_mode));
    }
  else
    {
      *target = strdup (path);
      if (*target == NULL)
        return hl_error_set (err, HL_ERR_NOMEM, path, "%s", _("Out of memory while saving"));
    }
  *exists = true;
  *old = st;
  return HL_OK;
}

HlStatus
hl_output_path_check (const char *path, HlError *err)
{
  char *target = NULL;
  struct stat old;
  bool exists;
  HlStatus st = resolve_output (path, &target, &old, &exists, err);
  free (target);
  return st;
}

bool
hl_file_same (const char *a, const char *b)
{
  struct stat sa, sb;
  return a != NULL && b != NULL && stat (a, &sa) == 0 && stat (b, &sb) == 0
         && sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}

static HlStatus write_file_atomic (const char *path, const void *data, size_t size,
                                   bool keep_backup, HlError *err);

/* FNV-1a, 32 bits (Fowler, Noll and Vo; public domain): a name's short
 * fingerprint, not a security measure. */
static uint32_t
name_hash (const char *s)
{
  uint32_t h = 2166136261u;
  for (; *s != '\0'; s++)
    {
      h ^= (unsigned char) *s;
      h *= 16777619u;
    }
  return h;
}

char *
hl_backup_path (const char *path)
{
  const char *slash = strrchr (path, '/');
  const char *base = slash != NULL ? slash + 1 : path;
  size_t dir_len = (size_t) (base - path);
  size_t base_len = strlen (base);
  const size_t suffix_len = sizeof HL_PLAN_BACKUP_SUFFIX - 1;
  const size_t mark_len = 9;              /* "." and 8 hex digits */
  long name_max = 255;
  char *dir = dir_len > 0 ? strndup (path, dir_len) : strdup (".");
  if (dir == NULL)
    return NULL;
  errno = 0;
  long v = pathconf (dir, _PC_NAME_MAX);
  if (v > 0 && v <= 4096)
    name_max = v;
  free (dir);

  size_t n = strlen (path) + suffix_len + 1;
  char *out = malloc (n);
  if (out == NULL)
    return NULL;
  if (base_len + suffix_len <= (size_t) name_max
      || (size_t) name_max < suffix_len + mark_len + 1)
    {
      snprintf (out, n, "%s" HL_PLAN_BACKUP_SUFFIX, path);
      return out;
    }
  size_t keep = (size_t) name_max - suffix_len - mark_len;
  /* not inside a UTF-8 character */
  while (keep > 0 && ((unsigned char) base[keep] & 0xc0) == 0x80)
    keep--;
  snprintf (out, n, "%.*s%.*s.%08x" HL_PLAN_BACKUP_SUFFIX, (int) dir_len, path, (int) keep,
            base, (unsigned) name_hash (base));
  return out;
}

/* Keeps the file at path as hl_backup_path (path): a hard link, so the
 * file itself is never missing, or a copy where the file system has no
 * links.  Returns 0 or an errno value. */
static int
keep_previous_version (const char *path)
{
  struct stat st;
  if (lstat (path, &st) != 0)
    return errno == ENOENT ? 0 : errno;
  if (!S_ISREG (st.st_mode))
    return 0;
  char *backup = hl_backup_path (path);
  if (backup == NULL)
    return ENOMEM;
  int e = 0;
  if (unlink (backup) != 0 && errno != ENOENT)
    e = errno;
  else if (link (path, backup) != 0)
    {
      e = errno;
      if (e == EPERM || e == EOPNOTSUPP || e == EMLINK || e == ENOSYS)
        {
          FILE *f = fopen (path, "rb");
          char *copy = f != NULL ? malloc ((size_t) st.st_size + 1) : NULL;
          if (f == NULL)
            e = errno;
          else if (copy == NULL)
            e = ENOMEM;
          else if (fread (copy, 1, (size_t) st.st_size, f) != (size_t) st.st_size)
            e = EIO;
          else
            e = write_file_atomic (backup, copy, (size_t) st.st_size, false, NULL) == HL_OK
                ? 0 : EIO;
          free (copy);
          if (f != NULL)
            fclose (f);
        }
    }
  free (backup);
  return e;
}

/* Gives the new file the old one's owner (where the process may) and
 * permission bits; a new name gets HL_FILE_MODE less the umask.  Returns 0
 * or an errno value (only a failed chmod counts). */
static int
set_owner_and_mode (int fd, bool exists, const struct stat *old)
{
  if (!exists)
    return fchmod (fd, HL_FILE_MODE & ~current_umask ()) != 0 ? errno : 0;
  /* Only root may give a file away; a member of the old group may keep the
   * group.  Either failing leaves the writer's own, as a new file has. */
  if (old->st_uid != geteuid () || old->st_gid != getegid ())
    {
      if (fchown (fd, old->st_uid, old->st_gid) != 0
          && fchown (fd, (uid_t) -1, old->st_gid) != 0)
        {
          /* nothing more the process may do */
        }
    }
  /* After fchown (which clears the set-ID bits; HL_FILE_PERMISSION_BITS
   * leaves them cleared). */
  return fchmod (fd, old->st_mode & HL_FILE_PERMISSION_BITS) != 0 ? errno : 0;
}

struct HlOutFile {
  char *path;     /* as given, for messages */
  char *target;   /* what is renamed over: path, or a link's target */
  char *dir;
  char *tmp;
  int fd;
  int error;      /* errno of the first failed write, 0 */
  bool keep_backup;
};

static void
out_file_free (HlOutFile *f)
{
  if (f == NULL)
    return;
  free (f->path);
  free (f->target);
  free (f->dir);
  free (f->tmp);
  free (f);
}

HlStatus
hl_out_file_open (const char *path, bool keep_backup, HlOutFile **out, HlError *err)
{
  char *target = NULL;
  struct stat old;
  bool exists = false;
  *out = NULL;
  HlStatus st = resolve_output (path, &target, &old, &exists, err);
  if (st != HL_OK)
    return st;

  HlOutFile *f = calloc (1, sizeof *f);
  const char *slash = strrchr (target, '/');
  size_t dir_len = slash == NULL ? 1 : (slash == target ? 1 : (size_t) (slash - target));
  size_t tmp_size = dir_len + sizeof "/" HL_TEMP_NAME;
  if (f != NULL)
    {
      f->target = target;
      f->path = strdup (path);
      f->dir = malloc (dir_len + 1);
      f->tmp = malloc (tmp_size);
      f->fd = -1;
      f->keep_backup = keep_backup;
    }
  if (f == NULL || f->path == NULL || f->dir == NULL || f->tmp == NULL)
    {
      if (f == NULL)
        free (target);
      out_file_free (f);
      return hl_error_set (err, HL_ERR_NOMEM, path, "%s", _("Out of memory while saving"));
    }
  if (slash == NULL)
    memcpy (f->dir, ".", 2);
  else if (slash == target)
    memcpy (f->dir, "/", 2);
  else
    {
      memcpy (f->dir, target, dir_len);
      f->dir[dir_len] = '\0';
    }
  snprintf (f->tmp, tmp_size, "%s/" HL_TEMP_NAME, strcmp (f->dir, "/") == 0 ? "" : f->dir);

  f->fd = mkstemp (f->tmp);
  if (f->fd < 0)
    {
      int e = errno;
      struct stat dir_st;
      /* Some file systems (/proc) answer ENOENT for a folder that exists
       * but takes no new files. */
      bool dir_exists = stat (f->dir, &dir_st) == 0 && S_ISDIR (dir_st.st_mode);
      if ((e == ENOENT || e == ENOTDIR) && !dir_exists)
        st = hl_error_set (err, HL_ERR_IO, path,
                           _("Cannot save \"%s\": the folder \"%s\" does not exist"),
                           path, f->dir);
      else
        st = hl_error_set (err, HL_ERR_IO, path,
                           _("Cannot save \"%s\": cannot create a file in \"%s\": %s"),
                           path, f->dir, strerror (e));
      out_file_free (f);
      return st;
    }
  fcntl (f->fd, F_SETFD, FD_CLOEXEC);
  f->error = set_owner_and_mode (f->fd, exists, &old);
  *out = f;
  return HL_OK;
}

HlStatus
hl_out_file_write (HlOutFile *f, const void *data, size_t size, HlError *err)
{
  const char *p = data;
  size_t left = size;
  while (f->error == 0 && left > 0)
    {
      ssize_t n = write (f->fd, p, left);
      if (n < 0 && errno == EINTR)
        continue;
      if (n <= 0)
        {
          f->error = n < 0 ? errno : EIO;
          break;
        }
      p += n;
      left -= (size_t) n;
    }
  if (f->error != 0)
    return hl_error_set (err, HL_ERR_IO, f->path, _("Cannot save \"%s\": %s"), f->path,
                         strerror (f->error));
  return HL_OK;
}

void
hl_out_file_abort (HlOutFile *f)
{
  if (f == NULL)
    return;
  if (f->fd >= 0)
    close (f->fd);
  unlink (f->tmp);
  out_file_free (f);
}

HlStatus
hl_out_file_commit (HlOutFile *f, HlError *err)
{
  HlStatus st = HL_OK;
  const char *path = f->path;
  int e = f->error;
  if (e == 0 && fsync (f->fd) != 0)
    e = errno;
  if (close (f->fd) != 0 && e == 0)
    e = errno;
  f->fd = -1;
  char *again = NULL;
  struct stat now;
  bool exists_now = false;
  if (e != 0)
    st = hl_error_set (err, HL_ERR_IO, path, _("Cannot save \"%s\": %s"), path,
                       strerror (e));
  /* What is at the path may have changed while the bytes were written. */
  else if ((st = resolve_output (path, &again, &now, &exists_now, err)) != HL_OK)
    {
      /* err says what is in the way now */
    }
  else if (strcmp (again, f->target) != 0)
    st = hl_error_set (err, HL_ERR_IO, path,
                       _("Cannot save \"%s\": it was changed while saving; nothing "
                         "was written"), path);
  else if (f->keep_backup && (e = keep_previous_version (f->target)) != 0)
    {
      char *backup = hl_backup_path (f->target);
      st = hl_error_set (err, HL_ERR_IO, path,
                         _("Cannot save \"%s\": the previous version could not be kept "
                           "as \"%s\": %s; the file was not changed"),
                         path, backup != NULL ? backup : HL_PLAN_BACKUP_SUFFIX,
                         strerror (e));
      free (backup);
    }
  else if (rename (f->tmp, f->target) != 0)
    {
      e = errno;
      if (e == EISDIR)
        st = hl_error_set (err, HL_ERR_IO, path,
                           _("Cannot save \"%s\": a folder of that name is in the way"),
                           path);
      else
        st = hl_error_set (err, HL_ERR_IO, path, _("Cannot save \"%s\": %s"), path,
                           strerror (e));
    }
  free (again);
  if (st != HL_OK)
    {
      hl_out_file_abort (f);
      return st;
    }
  /* The rename itself is durable once the folder is flushed. */
  int dfd = open (f->dir, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (dfd >= 0)
    {
      fsync (dfd);
      close (dfd);
    }
  out_file_free (f);
  return HL_OK;
}

static HlStatus
write_file_atomic (const char *path, const void *data, size_t size, bool keep_backup,
                   HlError *err)
{
  HlOutFile *f = NULL;
  HlStatus st = hl_out_file_open (path, keep_backup, &f, err);
  if (st != HL_OK)
    return st;
  if (hl_out_file_write (f, data, size, err) != HL_OK)
    {
      hl_out_file_abort (f);
      return HL_ERR_IO;
    }
  return hl_out_file_commit (f, err);
}

HlStatus
hl_write_file_atomic (const char *path, const void *data, size_t size, HlError *err)
{
  return write_file_atomic (path, data, size, false, err);
}

HlStatus
hl_write_file_atomic_backup (const char *path, const void *data, size_t size,
                             HlError *err)
{
  return write_file_atomic (path, data, size, true, err);
}
