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

/* The stable message codes, one per kind of description error or warning,
 * from the one registry messages.def (GP_MSG_NONE: not yet given one). */
enum gp_message {
	GP_MSG_NONE,
#define GP_MESSAGE(name, code, meaning) GP_MSG_##name,
#include "messages.def"
#undef GP_MESSAGE
	GP_MSG_COUNT
};

/* The code ("unknown-key") and meaning of a message; "" for GP_MSG_NONE. */
const char *gp_message_code(enum gp_message message);
const char *gp_message_meaning(enum gp_message message);

struct gp_diag_entry {
	enum gp_severity severity;
	enum gp_message code;
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
/* Record an error or a warning with its stable code; gp_diag_fail returns
 * false like gp_diag_error. */
bool gp_diag_fail(struct gp_diag *diag, enum gp_message code,
		  const struct gp_where *where, const char *format, ...)
	__attribute__((format(printf, 4, 5)));
void gp_diag_warn(struct gp_diag *diag, enum gp_message code,
		  const struct gp_where *where, const char *format, ...)
	__attribute__((format(printf, 4, 5)));
/* Record a copy of another diag's entry, with its severity and code. */
void gp_diag_copy(struct gp_diag *diag, const struct gp_diag_entry *entry);
/* The one out-of-memory error, "out of memory" (at where, which may be
 * NULL); returns false like gp_diag_error. */
bool gp_diag_oom(struct gp_diag *diag, const struct gp_where *where);
void gp_diag_add(struct gp_diag *diag, enum gp_severity severity,
		 enum gp_message code, const struct gp_where *where,
		 const char *format, va_list args)
	__attribute__((format(printf, 5, 0)));

#endif
