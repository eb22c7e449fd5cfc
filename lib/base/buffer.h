/* A growable byte buffer with a sticky failure flag: once an allocation
 * fails, every later call is a no-op and failed stays true. */
#ifndef GP_BUFFER_H
#define GP_BUFFER_H

#include <stdbool.h>
#include <stddef.h>

struct gp_buffer {
	char *data;
	size_t size;
	size_t capacity;
	bool failed;
};

void gp_buffer_init(struct gp_buffer *buffer);
void gp_buffer_finish(struct gp_buffer *buffer);
bool gp_buffer_append(struct gp_buffer *buffer, const void *data, size_t size);
bool gp_buffer_puts(struct gp_buffer *buffer, const char *text);
bool gp_buffer_printf(struct gp_buffer *buffer, const char *format, ...)
	__attribute__((format(printf, 2, 3)));

#endif
