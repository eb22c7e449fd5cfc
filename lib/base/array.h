/* Growable arrays, in the manner of xkbcommon's darray: the caller holds a
 * typed pointer, a count and a capacity; gp_array_reserve makes room,
 * doubling the capacity, so that appending is amortised constant time.
 *
 *     if (!gp_array_reserve(set->items, set->capacity, set->count + 1))
 *             return gp_diag_oom(diag, NULL);
 *     set->items[set->count++] = item;
 *
 * On failure (out of memory, or a size that would overflow size_t) the
 * array is left as it was, still owned by the caller. */
#ifndef GP_ARRAY_H
#define GP_ARRAY_H

#include <stdbool.h>
#include <stddef.h>

/* Room for `need` items of `size` bytes in the array whose pointer is at
 * `items` (a T **) and whose capacity is *capacity.  Use the macro. */
bool gp_array_reserve_(void *items, size_t *capacity, size_t need,
		       size_t size);

#define gp_array_reserve(items, capacity, need)                              \
	gp_array_reserve_(&(items), &(capacity), (need), sizeof(*(items)))

#endif
