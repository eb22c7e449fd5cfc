/* Diagnostics: the library never prints; it records messages here. */
#ifndef GP_DIAG_H
#define GP_DIAG_H

#include "glassplot.h"

#include <stdarg.h>
#include <stdbool.h>
#include <stddef.h>

/* A place in the user's description.  file is borrowed (owned by the spec
 * or a static string); line and col are 1-based; line 0 means "no line",
 * used for command-line overrides ("--set #2"). */
struct gp_where {
	const char *file;
	int line;
	int col;
};

struct gp_diag_entry {
	enum gp_severity severity;
	char *message; /* whole line, "FILE:LINE:COL: text" when placed */
};

struct gp_diag {
	struct gp_diag_entry *entries;
	size_t count;
	size_t capacity;
	size_t errors;
	/* set when an allocation failed while recording; the count is then low */
	bool lost;
};

void gp_diag_init(struct gp_diag *diag);
void gp_diag_finish(struct gp_diag *diag);

/* Record a message; where may be NULL.  Always returns false so that
 * callers can write "return gp_diag_error(...)". */
bool gp_diag_error(struct gp_diag *diag, const struct gp_where *where,
		   const char *format, ...)
	__attribute__((format(printf, 3, 4)));
void gp_diag_warning(struct gp_diag *diag, const struct gp_where *where,
		     const char *format, ...)
	__attribute__((format(printf, 3, 4)));
void gp_diag_note(struct gp_diag *diag, const struct gp_where *where,
		  const char *format, ...)
	__attribute__((format(printf, 3, 4)));
/* The one out-of-memory error, "out of memory" (at where, which may be
 * NULL); returns false like gp_diag_error. */
bool gp_diag_oom(struct gp_diag *diag, const struct gp_where *where);
void gp_diag_add(struct gp_diag *diag, enum gp_severity severity,
		 const struct gp_where *where, const char *format, va_list args)
	__attribute__((format(printf, 4, 0)));

#endif
