/* Dot-matrix layout: pixels, nets and the pitch budget (DESIGN.md §3,
 * "the span is the datum"). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "build.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

struct fixture {
	struct gp_diag diag;
	struct gp_design *design;
	struct gp_build *build;
};

static void make(struct fixture *f, long cells, long lines, long across,
		 long down, const char *cell_pitch, bool share)
{
	char text[2048];
	snprintf(text, sizeof(text),
		 "glass: {part: T}\n"
		 "front: {size: [9000, 400]}\n"
		 "back: {size: [9000, 400]}\n"
		 "viewing_area: {position: [1, 1], size: [8990, 390]}\n"
		 "blocks:\n"
		 "  m:\n"
		 "    origin: [2.000001, 390]\n"
		 "    cells: [%ld, %ld]\n"
		 "    dots: [%ld, %ld]\n"
		 "    dot_size: [0.45, 0.5]\n"
		 "    dot_pitch: [0.5, 0.55]\n"
		 "    cell_pitch: %s\n"
		 "    line_pitch: %.3f\n"
		 "    share_segments: %s\n",
		 cells, lines, across, down, cell_pitch,
		 0.55 * (double)down + 0.7, share ? "true" : "false");
	gp_diag_init(&f->diag);
	f->design = gp_design_load_buffer("m.yaml", text, strlen(text), NULL,
					  0, &f->diag);
	if (!f->design)
		fail_msg("%s", f->diag.entries[0].message);
	f->build = gp_build_create(f->design, &f->diag);
	assert_non_null(f->build);
}

static void finish(struct fixture *f)
{
	gp_build_destroy(f->build);
	gp_design_destroy(f->design);
	gp_diag_finish(&f->diag);
}

static int64_t overlap_area(struct gp_box a, struct gp_box b)
{
	int64_t w = (a.x1 < b.x1 ? a.x1 : b.x1) - (a.x0 > b.x0 ? a.x0 : b.x0);
	int64_t h = (a.y1 < b.y1 ? a.y1 : b.y1) - (a.y0 > b.y0 ? a.y0 : b.y0);
	return w > 0 && h > 0 ? w * h : 0;
}

/* Each pixel is the overlap of exactly one common strip and one segment
 * strip, and that overlap is exactly the nominal dot. */
static void check_pixels(const struct fixture *f)
{
	const struct gp_artwork *art = &f->build->art;
	for (size_t p = 0; p < art->pixel_count; p++) {
		const struct gp_pixel *px = &art->pixels[p];
		int commons = 0, segments = 0;
		struct gp_box common_box = gp_box_none(), segment_box = gp_box_none();
		for (size_t s = 0; s < art->shape_count; s++) {
			const struct gp_shape *sh = &art->shapes[s];
			if (sh->role != GP_ROLE_ELECTRODE)
				continue;
			struct gp_box box = gp_polygon_bounds(&sh->poly);
			if (overlap_area(box, px->box) == 0)
				continue;
			if (art->nets[sh->net].kind == GP_NET_COMMON) {
				commons++;
				assert_int_equal(sh->net, px->common);
				assert_int_equal(sh->layer, GP_LAYER_BACK_ITO);
				common_box = box;
			} else {
				segments++;
				assert_int_equal(sh->net, px->segment);
				assert_int_equal(sh->layer, GP_LAYER_FRONT_ITO);
				segment_box = box;
			}
		}
		assert_int_equal(commons, 1);
		assert_int_equal(segments, 1);
		struct gp_box lit = {
			common_box.x0 > segment_box.x0 ? common_box.x0 : segment_box.x0,
			common_box.y0 > segment_box.y0 ? common_box.y0 : segment_box.y0,
			common_box.x1 < segment_box.x1 ? common_box.x1 : segment_box.x1,
			common_box.y1 < segment_box.y1 ? common_box.y1 : segment_box.y1,
		};
		assert_memory_equal(&lit, &px->box, sizeof(lit));
		/* nominal dot: 0.45 x 0.5 mm */
		assert_int_equal(gp_box_width(px->box), 450000);
		assert_int_equal(gp_box_height(px->box), 500000);
	}
}

static void count_nets(const struct gp_artwork *art, long *commons,
		       long *segments)
{
	*commons = *segments = 0;
	for (size_t i = 0; i < art->net_count; i++)
		if (art->nets[i].kind == GP_NET_COMMON)
			(*commons)++;
		else
			(*segments)++;
}

static void pixels_and_nets(void **state)
{
	(void)state;
	static const struct {
		long cells, lines, across, down;
		bool share;
	} cases[] = {
		{ 1, 1, 1, 1, true }, { 16, 2, 5, 8, true },
		{ 8, 3, 5, 7, false }, { 4, 1, 6, 9, false },
	};
	for (size_t i = 0; i < sizeof(cases) / sizeof(cases[0]); i++) {
		struct fixture f;
		make(&f, cases[i].cells, cases[i].lines, cases[i].across,
		     cases[i].down, "3.2", cases[i].share);
		long commons, segments;
		count_nets(&f.build->art, &commons, &segments);
		/* commons: one per dot row per line; segments: one per dot
		 * column per cell, per line unless the lines share them */
		assert_int_equal(commons, cases[i].lines * cases[i].down);
		assert_int_equal(segments, cases[i].cells * cases[i].across *
						   (cases[i].share ? 1 : cases[i].lines));
		assert_int_equal(f.build->art.pixel_count,
				 cases[i].cells * cases[i].lines *
					 cases[i].across * cases[i].down);
		check_pixels(&f);
		/* net names are COM1.. and SEG1.. in creation order */
		assert_string_equal(f.build->art.nets[0].name, "COM1");
		finish(&f);
	}
}

/* For any count up to 1000 and an awkward pitch, the last cell sits at
 * origin + (n - 1) * pitch to the nanometre. */
static void pitch_budget(void **state)
{
	(void)state;
	static const char *const pitches[] = { "4.123457", "3.333333",
					       "2.999999", "7.000001" };
	static const long counts[] = { 1, 2, 3, 7, 99, 500, 999, 1000 };
	for (size_t p = 0; p < 4; p++) {
		for (size_t c = 0; c < 8; c++) {
			struct fixture f;
			make(&f, counts[c], 1, 1, 1, pitches[p], true);
			const struct gp_block *b = &f.design->blocks[0];
			const struct gp_artwork *art = &f.build->art;
			const struct gp_pixel *last =
				&art->pixels[art->pixel_count - 1];
			int64_t ideal = b->origin.x +
					(counts[c] - 1) * b->cell_pitch;
			assert_int_equal(last->box.x0, ideal);
			assert_int_equal(last->box.x0 - art->pixels[0].box.x0,
					 (counts[c] - 1) * b->cell_pitch);
			finish(&f);
		}
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(pixels_and_nets),
		cmocka_unit_test(pitch_budget),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
