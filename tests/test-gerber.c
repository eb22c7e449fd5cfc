/* Tests of the Gerber writer.  "Spec" below means the Gerber Layer Format
 * Specification, Ucamco, revision 2024.05; section numbers are from it. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <cmocka.h>

#include "artwork.h"
#include "buffer.h"
#include "gerber.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const struct gp_gerber_info info = { "GX-1001", "0.1.0", NULL };

static void add_box(struct gp_artwork *art, enum gp_layer layer,
		    enum gp_role role, int64_t x0, int64_t y0, int64_t x1,
		    int64_t y1)
{
	assert_non_null(gp_artwork_add_box(art, layer, role, GP_NET_NONE,
					   gp_box_make(x0, y0, x1, y1)));
}

static char *write_layer(const struct gp_artwork *art, enum gp_layer layer,
			 const struct gp_gerber_info *with)
{
	struct gp_buffer out;
	gp_buffer_init(&out);
	const char *why = NULL;
	bool ok = gp_gerber_write_why(&out, art, layer, with, &why);
	if (!ok)
		fail_msg("gp_gerber_write: %s", why ? why : "?");
	char *text = strdup(out.data);
	gp_buffer_finish(&out);
	assert_non_null(text);
	return text;
}

/* Spec 4.2 (FS), 4.1 (MO), 5.6 (file attributes), 4.13 (M02): the header
 * and the end of a file. */
static void test_header(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	add_box(&art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, 0, 0, 1000000,
		2000000);
	char *text = write_layer(&art, GP_LAYER_FRONT_ITO, &info);
	const char *fs = strstr(text, "%FSLAX46Y46*%\n");
	const char *mo = strstr(text, "%MOMM*%\n");
	const char *first_coordinate = strstr(text, "\nX");
	assert_non_null(fs);
	assert_non_null(mo);
	assert_non_null(first_coordinate);
	assert_true(fs < first_coordinate && mo < first_coordinate);
	assert_non_null(strstr(text, "%TF.GenerationSoftware,glassplot,"
				     "glassplot,0.1.0*%\n"));
	assert_non_null(strstr(text, "%TF.FileFunction,Other,front-ito*%\n"));
	assert_non_null(strstr(text, "%TF.FilePolarity,Positive*%\n"));
	assert_non_null(strstr(text, "%TF.Part,Single*%\n"));
	assert_non_null(strstr(text, "%TF.SameCoordinates,GX-1001*%\n"));
	assert_null(strstr(text, "CreationDate"));
	/* at least one aperture even with regions only */
	assert_non_null(strstr(text, "%ADD10C,"));
	size_t n = strlen(text);
	assert_true(n > 5);
	assert_string_equal(text + n - 5, "M02*\n");
	free(text);
	gp_artwork_finish(&art);
}

/* Spec 4.10: a region per filled shape; format 4.6 in mm makes the
 * coordinate integer the nanometre value. */
static void test_exact_region(void **state)
{
	struct gp_artwork art;
	gp_artwork_init(&art);
	add_box(&art, GP_LAYER_BACK_ITO, GP_ROLE_ELECTRODE, 4123457, -1,
		9999999999, 1234567891);
	char *text = write_layer(&art, GP_LAYER_BACK_ITO, &info);
	assert_non_null(strstr(text, "G36*\nX4123457Y-1D02*\n"
				     "X9999999999Y-1D01*\n"
				     "X9999999999Y1234567891D01*\n"
				     "X4123457Y1234567891D01*\n"
				     "X4123457Y-1D01*\nG37*\n"));
	free(text);
	gp_artwork_finish(&art);
}

static void test_determinism(void **state)
{
	struct gp_artwork a, b;
	gp_artwork_init(&a);
	gp_artwork_init(&b);
	for (int i = 0; i < 50; i++) {
		add_box(&a, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, i * 1000000, 0,
			i * 1000000 + 500000, 3000000);
		add_box(&b, GP_LAYER_FRONT_ITO, GP_ROLE_PAD, i * 1000000, 0,
			i * 1000000 + 500000, 3000000);
	}
	char *ta = write_layer(&a, GP_LAYER_FRONT_ITO, &info);
	char *tb = write_layer(&b, GP_LAYER_FRONT_ITO, &info);
	char *tc = write_layer(&a, GP_LAYER_FRONT_ITO, &info);
	assert_string_equal(ta, tb);
	assert_string_equal(ta, tc);
	free(ta);
	free(tb);
	free(tc);
	gp_artwork_finish(&a);
	gp_artwork_finish(&b);
}

static void test_date(void **state)
{
	char date[32];
	/* reference values from GNU date: date -u -d @N +%FT%T */
	assert_true(gp_gerber_format_date(date, sizeof(date), 0));
	assert_string_equal(date, "1970-01-01T00:00:00+00:00");
	assert_true(gp_gerber_format_date(date, sizeof(date), 1700000000));
	assert_string_equal(date, "2023-11-14T22:13:20+00:00");
	assert_false(gp_gerber_format_date(date, 10, 0));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_header),
		cmocka_unit_test(test_exact_region),
		cmocka_unit_test(test_determinism),
		cmocka_unit_test(test_date),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
