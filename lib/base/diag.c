#include "diag.h"

#include "array.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void gp_diag_init(struct gp_diag *diag)
{
	memset(diag, 0, sizeof(*diag));
}

void gp_diag_finish(struct gp_diag *diag)
{
	for (size_t i = 0; i < diag->count; i++)
		free(diag->entries[i].message);
	free(diag->entries);
	gp_diag_init(diag);
}

__attribute__((format(printf, 2, 0)))
static char *format_message(const struct gp_where *where, const char *format,
			    va_list args)
{
	char prefix[512] = "";
	if (where && where->file && where->line > 0)
		snprintf(prefix, sizeof(prefix), "%s:%d:%d: ", where->file,
			 where->line, where->col);
	else if (where && where->file)
		snprintf(prefix, sizeof(prefix), "%s: ", where->file);
	va_list copy;
	va_copy(copy, args);
	int n = vsnprintf(NULL, 0, format, copy);
	va_end(copy);
	if (n < 0)
		return NULL;
	size_t length = strlen(prefix) + (size_t)n;
	char *message = malloc(length + 1);
	if (!message)
		return NULL;
	strcpy(message, prefix);
	vsnprintf(message + strlen(prefix), (size_t)n + 1, format, args);
	/* one message, one line */
	for (char *p = message; *p; p++)
		if (*p == '\n' || *p == '\r')
			*p = ' ';
	return message;
}

static const struct {
	const char *code;
	const char *meaning;
} messages[GP_MSG_COUNT] = {
	[GP_MSG_NONE] = { "", "" },
#define GP_MESSAGE(name, code, meaning) [GP_MSG_##name] = { code, meaning },
#include "messages.def"
#undef GP_MESSAGE
};

const char *gp_message_code(enum gp_message message)
{
	return message < GP_MSG_COUNT ? messages[message].code : "";
}

const char *gp_message_meaning(enum gp_message message)
{
	return message < GP_MSG_COUNT ? messages[message].meaning : "";
}

/* The one funnel every message passes through. */
void gp_diag_add(struct gp_diag *diag, enum gp_severity severity,
		 enum gp_message code, const struct gp_where *where,
		 const char *format, va_list args)
{
	if (severity == GP_SEVERITY_ERROR)
		diag->errors++;
	if (!gp_array_reserve(diag->entries, diag->capacity, diag->count + 1)) {
		diag->lost = true;
		return;
	}
	char *message = format_message(where, format, args);
	if (!message) {
		diag->lost = true;
		return;
	}
	diag->entries[diag->count++] =
		(struct gp_diag_entry){ severity, code, message };
}

bool gp_diag_error(struct gp_diag *diag, const struct gp_where *where,
		   const char *format, ...)
{
	va_list args;
	va_start(args, format);
	gp_diag_add(diag, GP_SEVERITY_ERROR, GP_MSG_NONE, where, format, args);
	va_end(args);
	return false;
}

void gp_diag_warning(struct gp_diag *diag, const struct gp_where *where,
		     const char *format, ...)
{
	va_list args;
	va_start(args, format);
	gp_diag_add(diag, GP_SEVERITY_WARNING, GP_MSG_NONE, where, format,
		    args);
	va_end(args);
}

void gp_diag_note(struct gp_diag *diag, const struct gp_where *where,
		  const char *format, ...)
{
	va_list args;
	va_start(args, format);
	gp_diag_add(diag, GP_SEVERITY_NOTE, GP_MSG_NONE, where, format, args);
	va_end(args);
}

bool gp_diag_fail(struct gp_diag *diag, enum gp_message code,
		  const struct gp_where *where, const char *format, ...)
{
	va_list args;
	va_start(args, format);
	gp_diag_add(diag, GP_SEVERITY_ERROR, code, where, format, args);
	va_end(args);
	return false;
}

void gp_diag_warn(struct gp_diag *diag, enum gp_message code,
		  const struct gp_where *where, const char *format, ...)
{
	va_list args;
	va_start(args, format);
	gp_diag_add(diag, GP_SEVERITY_WARNING, code, where, format, args);
	va_end(args);
}

static void add(struct gp_diag *diag, enum gp_severity severity,
		enum gp_message code, const struct gp_where *where,
		const char *format, ...) __attribute__((format(printf, 5, 6)));

static void add(struct gp_diag *diag, enum gp_severity severity,
		enum gp_message code, const struct gp_where *where,
		const char *format, ...)
{
	va_list args;
	va_start(args, format);
	gp_diag_add(diag, severity, code, where, format, args);
	va_end(args);
}

void gp_diag_copy(struct gp_diag *diag, const struct gp_diag_entry *entry)
{
	add(diag, entry->severity, entry->code, NULL, "%s", entry->message);
}

GP_EXPORT struct gp_diag *gp_diag_create(void)
{
	struct gp_diag *diag = malloc(sizeof(*diag));
	if (diag)
		gp_diag_init(diag);
	return diag;
}

GP_EXPORT void gp_diag_destroy(struct gp_diag *diag)
{
	if (!diag)
		return;
	gp_diag_finish(diag);
	free(diag);
}

GP_EXPORT size_t gp_diag_count(const struct gp_diag *diag)
{
	return diag->count;
}

GP_EXPORT size_t gp_diag_error_count(const struct gp_diag *diag)
{
	return diag->errors;
}

GP_EXPORT const char *gp_diag_message(const struct gp_diag *diag, size_t i)
{
	return i < diag->count ? diag->entries[i].message : NULL;
}

GP_EXPORT const char *gp_diag_code(const struct gp_diag *diag, size_t i)
{
	return i < diag->count ? gp_message_code(diag->entries[i].code) : NULL;
}

GP_EXPORT enum gp_severity gp_diag_severity(const struct gp_diag *diag,
					    size_t i)
{
	return i < diag->count ? diag->entries[i].severity : GP_SEVERITY_NOTE;
}

bool gp_diag_oom(struct gp_diag *diag, const struct gp_where *where)
{
	return gp_diag_fail(diag, GP_MSG_OUT_OF_MEMORY, where, "out of memory");
}

GP_EXPORT const char *gp_message_code_at(size_t n, const char **meaning)
{
	if (n + 1 >= GP_MSG_COUNT)
		return NULL;
	if (meaning)
		*meaning = messages[n + 1].meaning;
	return messages[n + 1].code;
}
