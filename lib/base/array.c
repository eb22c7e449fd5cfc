/* Growable arrays (array.h). */
#include "array.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* The smallest capacity an array grows to. */
#define FIRST_CAPACITY 8

bool gp_array_reserve_(void *items, size_t *capacity, size_t need,
		       size_t size)
{
	if (need <= *capacity)
		return true;
	size_t wanted = *capacity ? *capacity : FIRST_CAPACITY;
	while (wanted < need) {
		if (wanted > SIZE_MAX / 2)
			return false;
		wanted *= 2;
	}
	if (size && wanted > SIZE_MAX / size)
		return false;
	/* the pointer is copied, not read through a void ** */
	void *data;
	memcpy(&data, items, sizeof(data));
	void *grown = realloc(data, wanted * size);
	if (!grown)
		return false;
	memcpy(items, &grown, sizeof(grown));
	*capacity = wanted;
	return true;
}
