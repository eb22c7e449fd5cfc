/* Growable arrays (lib/base/array.h): growth, contents kept, overflow and
 * failure leave the array as it was. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "array.h"

#include <stdlib.h>

struct item {
	int value;
	char pad[12];
};

static void grows_and_keeps_items(void **state)
{
	(void)state;
	struct item *items = NULL;
	size_t count = 0, capacity = 0;
	for (int i = 0; i < 1000; i++) {
		assert_true(gp_array_reserve(items, capacity, count + 1));
		assert_true(capacity >= count + 1);
		items[count++] = (struct item){ .value = i };
	}
	for (int i = 0; i < 1000; i++)
		assert_int_equal(items[i].value, i);
	/* doubling: 8, 16, ... 1024 */
	assert_int_equal(capacity, 1024);
	free(items);
}

static void enough_room_changes_nothing(void **state)
{
	(void)state;
	int *items = NULL;
	size_t capacity = 0;
	assert_true(gp_array_reserve(items, capacity, 3));
	int *before = items;
	size_t had = capacity;
	assert_true(gp_array_reserve(items, capacity, had));
	assert_ptr_equal(items, before);
	assert_int_equal(capacity, had);
	assert_true(gp_array_reserve(items, capacity, 0));
	assert_int_equal(capacity, had);
	free(items);
}

static void overflow_leaves_the_array(void **state)
{
	(void)state;
	struct item *items = NULL;
	size_t capacity = 0;
	assert_true(gp_array_reserve(items, capacity, 5));
	struct item *before = items;
	size_t had = capacity;
	/* SIZE_MAX items cannot be counted in bytes */
	assert_false(gp_array_reserve(items, capacity, SIZE_MAX));
	assert_false(gp_array_reserve(items, capacity,
				      SIZE_MAX / sizeof(*items) + 1));
	assert_ptr_equal(items, before);
	assert_int_equal(capacity, had);
	free(items);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(grows_and_keeps_items),
		cmocka_unit_test(enough_room_changes_nothing),
		cmocka_unit_test(overflow_leaves_the_array),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
