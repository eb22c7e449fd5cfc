/* The pipeline: layout, routing and checks into a build; writers from it. */
#include "build.h"

#include "gerber.h"
#include "output.h"
#include "units.h"

#include "gp-config.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Width of the line that draws a cut outline: a drawing convention of
 * ours; the cut is along the line's centre. */
#define OUTLINE_LINE_WIDTH (100 * 1000)

GP_EXPORT const char *gp_version(void)
{
	return GP_VERSION;
}

static bool add_outline(struct gp_build *build, enum gp_layer layer,
			struct gp_box box)
{
	struct gp_shape *shape = gp_artwork_add_box(&build->art, layer,
						    GP_ROLE_OUTLINE,
						    GP_NET_NONE, box);
	if (!shape)
		return false;
	shape->line_width = OUTLINE_LINE_WIDTH;
	return true;
}

bool gp_outlines_layout(struct gp_build *build, struct gp_diag *diag)
{
	if (!add_outline(build, GP_LAYER_FRONT_OUTLINE,
			 build->design->front.box) ||
	    !add_outline(build, GP_LAYER_BACK_OUTLINE,
			 build->design->back.box))
		return gp_diag_error(diag, NULL, "out of memory");
	return true;
}

static void count_nets(const struct gp_artwork *art, size_t *commons,
		       size_t *segments)
{
	*commons = *segments = 0;
	for (size_t i = 0; i < art->net_count; i++) {
		if (art->nets[i].kind == GP_NET_COMMON)
			(*commons)++;
		else
			(*segments)++;
	}
}

static void write_summary(struct gp_build *build)
{
	const struct gp_design *d = build->design;
	struct gp_buffer *s = &build->summary;
	char w[32], h[32];
	gp_buffer_printf(s, "glass %s revision %s\n", d->part, d->revision);
	const struct gp_plate_spec *plates[2] = { &d->front, &d->back };
	for (int i = 0; i < 2; i++) {
		gp_format_mm_short(w, sizeof(w), gp_box_width(plates[i]->box));
		gp_format_mm_short(h, sizeof(h), gp_box_height(plates[i]->box));
		gp_buffer_printf(s, "%s plate: %s x %s mm%s\n",
				 i ? "back" : "front", w, h,
				 (enum gp_plate)i == d->segment_plate
					 ? ", segments"
					 : ", commons");
	}
	for (size_t i = 0; i < d->block_count; i++) {
		const struct gp_block *b = &d->blocks[i];
		gp_buffer_printf(s, "block %s: %ld x %ld cells of %ld x %ld "
				 "dots\n", b->name, b->cells, b->lines,
				 b->dots_across, b->dots_down);
	}
	size_t commons, segments;
	count_nets(&build->art, &commons, &segments);
	gp_buffer_printf(s, "commons: %zu\nsegments: %zu\npixels: %zu\n",
			 commons, segments, build->art.pixel_count);
	for (size_t i = 0; i < d->spec->override_count; i++)
		gp_buffer_printf(s, "override: %s\n", d->spec->overrides[i]);
	if (build->notes.size)
		gp_buffer_append(s, build->notes.data, build->notes.size);
}

GP_EXPORT struct gp_build *gp_build_create(const struct gp_design *design,
					   struct gp_diag *diag)
{
	struct gp_build *build = calloc(1, sizeof(*build));
	if (!build) {
		gp_diag_error(diag, NULL, "out of memory");
		return NULL;
	}
	build->design = design;
	gp_artwork_init(&build->art);
	gp_buffer_init(&build->summary);
	gp_buffer_init(&build->notes);
	/* pipeline order: blocks, digits, icons, routing, outlines, checks */
	if (!gp_blocks_layout(build, diag) ||
	    !gp_outlines_layout(build, diag)) {
		gp_build_destroy(build);
		return NULL;
	}
	write_summary(build);
	return build;
}

GP_EXPORT void gp_build_destroy(struct gp_build *build)
{
	if (!build)
		return;
	gp_artwork_finish(&build->art);
	gp_buffer_finish(&build->summary);
	gp_buffer_finish(&build->notes);
	free(build->blocks);
	free(build);
}

GP_EXPORT const char *gp_build_summary(const struct gp_build *build)
{
	return build->summary.data ? build->summary.data : "";
}

static bool add_gerbers(const struct gp_build *build,
			struct gp_output_set *set, struct gp_diag *diag)
{
	struct gp_gerber_info info = {
		.part_number = build->design->part,
		.version = GP_VERSION,
		.creation_date = NULL,
	};
	for (int layer = 0; layer < GP_LAYER_COUNT; layer++) {
		bool used = false;
		for (size_t i = 0; i < build->art.shape_count && !used; i++)
			used = build->art.shapes[i].layer == (enum gp_layer)layer;
		if (!used)
			continue;
		char name[64];
		snprintf(name, sizeof(name), "%s.gbr",
			 gp_layer_name((enum gp_layer)layer));
		struct gp_buffer *out = gp_output_add(set, name, diag);
		if (!out || !gp_gerber_write(out, &build->art,
					     (enum gp_layer)layer, &info))
			return gp_diag_error(diag, NULL, "%s: cannot write the "
					     "Gerber file", name);
	}
	return true;
}

bool gp_build_outputs(const struct gp_build *build,
		      struct gp_output_set *set, struct gp_diag *diag)
{
	return add_gerbers(build, set, diag);
}

GP_EXPORT bool gp_build_write(struct gp_build *build, const char *folder,
			      struct gp_diag *diag)
{
	struct gp_output_set set;
	gp_output_set_init(&set);
	bool ok = gp_build_outputs(build, &set, diag) &&
		  gp_output_commit(&set, folder, diag);
	for (size_t i = 0; ok && i < set.count; i++)
		gp_buffer_printf(&build->summary, "wrote: %s/%s\n", folder,
				 set.files[i].name);
	gp_output_set_finish(&set);
	return ok;
}
