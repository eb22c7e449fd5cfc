#include "buffer.h"

#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void gp_buffer_init(struct gp_buffer *buffer)
{
	memset(buffer, 0, sizeof(*buffer));
}

void gp_buffer_finish(struct gp_buffer *buffer)
{
	free(buffer->data);
	gp_buffer_init(buffer);
}

static bool reserve(struct gp_buffer *buffer, size_t extra)
{
	if (buffer->failed)
		return false;
	if (buffer->size + extra + 1 <= buffer->capacity)
		return true;
	/* small first: the pin matrix keeps a buffer per cell (tens of
	 * thousands on a large glass); doubling serves the large outputs */
	size_t capacity = buffer->capacity ? buffer->capacity : 32;
	while (capacity < buffer->size + extra + 1) {
		if (capacity > SIZE_MAX / 2) {
			buffer->failed = true;
			return false;
		}
		capacity *= 2;
	}
	char *data = realloc(buffer->data, capacity);
	if (!data) {
		buffer->failed = true;
		return false;
	}
	buffer->data = data;
	buffer->capacity = capacity;
	return true;
}

bool gp_buffer_append(struct gp_buffer *buffer, const void *data, size_t size)
{
	if (!reserve(buffer, size))
		return false;
	if (size)
		memcpy(buffer->data + buffer->size, data, size);
	buffer->size += size;
	buffer->data[buffer->size] = '\0';
	return true;
}

bool gp_buffer_puts(struct gp_buffer *buffer, const char *text)
{
	return gp_buffer_append(buffer, text, strlen(text));
}

bool gp_buffer_printf(struct gp_buffer *buffer, const char *format, ...)
{
	char small[256];
	va_list args;
	va_start(args, format);
	int n = vsnprintf(small, sizeof(small), format, args);
	va_end(args);
	if (n < 0) {
		buffer->failed = true;
		return false;
	}
	if ((size_t)n < sizeof(small))
		return gp_buffer_append(buffer, small, (size_t)n);
	if (!reserve(buffer, (size_t)n))
		return false;
	va_start(args, format);
	vsnprintf(buffer->data + buffer->size, (size_t)n + 1, format, args);
	va_end(args);
	buffer->size += (size_t)n;
	return true;
}
