#include "model.h"

#include "route-spec.h"
#include "units.h"

#include <stdlib.h>
#include <string.h>

/* Defaults for the rules: common practice, no published source. */
#define DEFAULT_MIN_LINE (30 * 1000)          /* 0.030 mm */
#define DEFAULT_MIN_SPACE (30 * 1000)         /* 0.030 mm */
#define DEFAULT_REGISTRATION (100 * 1000)     /* 0.100 mm */
#define DEFAULT_EDGE_CLEARANCE (500 * 1000)   /* 0.500 mm */
#define DEFAULT_CHORD_TOLERANCE (1000)        /* 0.001 mm */
#define DEFAULT_REGISTRATION_LOSS 0.05        /* our own choice: 5% */

static bool read_glass(struct gp_design *design, const struct gp_node *node,
		       struct gp_diag *diag)
{
	static const char *const plates[] = { "front", "back", NULL };
	struct gp_reader r;
	int segment_plate = GP_PLATE_FRONT;
	design->part = "UNNAMED";
	design->revision = "-";
	design->title = "";
	gp_reader_begin(&r, node, "'glass'", diag);
	gp_read_string(&r, "part", true, &design->part);
	gp_read_string(&r, "revision", false, &design->revision);
	gp_read_string(&r, "title", false, &design->title);
	gp_read_choice(&r, "segments_on", false, plates, &segment_plate);
	design->segment_plate = (enum gp_plate)segment_plate;
	return gp_reader_end(&r);
}

/* Every corner of a plate lies within GP_MAX_GLASS_MM of the origin, so
 * that everything drawn on the glass can be written. */
static void check_glass_limit(struct gp_reader *r, const struct gp_node *node,
			      const int64_t size[2], const int64_t position[2])
{
	int64_t limit = GP_MAX_GLASS_MM * GP_NM_PER_MM;
	for (int i = 0; r->ok && i < 2; i++) {
		int64_t far = position[i] + size[i]; /* both <= GP_LENGTH_MAX */
		if (position[i] >= -limit && far <= limit)
			continue;
		char text[32];
		gp_format_mm_short(text, sizeof(text),
				   position[i] < -limit ? position[i] : far);
		r->ok = gp_diag_fail(r->diag, GP_MSG_OUT_OF_RANGE, &node->where,
				     "%s reaches %s = %s mm; every plate "
				     "must lie within %d mm of the origin",
				     r->what, i ? "y" : "x", text,
				     GP_MAX_GLASS_MM);
	}
}

static bool read_plate(struct gp_plate_spec *plate, const char *what,
		       const struct gp_node *node, struct gp_diag *diag)
{
	struct gp_reader r;
	int64_t size[2] = { 0, 0 }, position[2] = { 0, 0 };
	gp_reader_begin(&r, node, what, diag);
	gp_read_size_pair(&r, "size", true, size);
	gp_read_pair(&r, "position", false, position);
	check_glass_limit(&r, node, size, position);
	plate->where = node->where;
	plate->box = gp_box_make(position[0], position[1],
				 position[0] + size[0], position[1] + size[1]);
	return gp_reader_end(&r);
}

static bool read_viewing(struct gp_design *design, const struct gp_node *node,
			 struct gp_diag *diag)
{
	struct gp_reader r;
	int64_t size[2] = { 0, 0 }, position[2] = { 0, 0 };
	gp_reader_begin(&r, node, "'viewing_area'", diag);
	gp_read_size_pair(&r, "size", true, size);
	gp_read_pair(&r, "position", true, position);
	design->viewing_where = node->where;
	design->viewing = gp_box_make(position[0], position[1],
				      position[0] + size[0],
				      position[1] + size[1]);
	return gp_reader_end(&r);
}

static bool read_rules(struct gp_rules *rules, const struct gp_node *node,
		       struct gp_diag *diag)
{
	struct gp_reader r;
	gp_reader_begin(&r, node, "'rules'", diag);
	rules->where = node->where;
	gp_read_size(&r, "min_line", false, &rules->min_line);
	gp_read_size(&r, "min_space", false, &rules->min_space);
	gp_read_size(&r, "registration", false, &rules->registration);
	gp_read_size(&r, "edge_clearance", false, &rules->edge_clearance);
	gp_read_size(&r, "chord_tolerance", false, &rules->chord_tolerance);
	gp_read_double(&r, "registration_loss", false, 0, 1,
		       &rules->registration_loss);
	return gp_reader_end(&r);
}

static void set_default_rules(struct gp_rules *rules)
{
	rules->min_line = DEFAULT_MIN_LINE;
	rules->min_space = DEFAULT_MIN_SPACE;
	rules->registration = DEFAULT_REGISTRATION;
	rules->edge_clearance = DEFAULT_EDGE_CLEARANCE;
	rules->chord_tolerance = DEFAULT_CHORD_TOLERANCE;
	rules->registration_loss = DEFAULT_REGISTRATION_LOSS;
}

/* The plates must overlap; that overlap is where any pixel can be. */
static bool check_plates(const struct gp_design *design, struct gp_diag *diag)
{
	struct gp_box f = design->front.box, b = design->back.box;
	if (f.x1 <= b.x0 || b.x1 <= f.x0 || f.y1 <= b.y0 || b.y1 <= f.y0)
		return gp_diag_fail(diag, GP_MSG_PLATES_APART,
				    &design->back.where,
				    "the back plate does not overlap the "
				    "front plate; check both 'position' "
				    "values");
	return true;
}

/* Top-level sections.  Modules add their key and reader here. */
static bool read_sections(struct gp_design *design, struct gp_diag *diag)
{
	struct gp_reader r;
	const struct gp_node *node;
	gp_reader_begin(&r, design->spec->root, "the description", diag);
	if ((node = gp_read_node(&r, "glass", true)))
		r.ok &= read_glass(design, node, diag);
	if ((node = gp_read_node(&r, "front", true)))
		r.ok &= read_plate(&design->front, "'front'", node, diag);
	if ((node = gp_read_node(&r, "back", true)))
		r.ok &= read_plate(&design->back, "'back'", node, diag);
	design->plates_ok = r.ok && check_plates(design, diag);
	r.ok &= design->plates_ok;
	if ((node = gp_read_node(&r, "viewing_area", true)))
		r.ok &= read_viewing(design, node, diag);
	if ((node = gp_read_node(&r, "rules", false)))
		r.ok &= read_rules(&design->rules, node, diag);
	if ((node = gp_read_node(&r, "blocks", false)))
		r.ok &= gp_blocks_read(design, node, diag);
	if ((node = gp_read_node(&r, "digits", false)))
		r.ok &= gp_digits_read(design, node, diag);
	if ((node = gp_read_node(&r, "proof", false)))
		r.ok &= gp_proof_read(design, node, diag);
	if ((node = gp_read_node(&r, "icons", false)))
		r.ok &= gp_icons_read(design, node, diag);
	if ((node = gp_read_node(&r, "drive", false)))
		r.ok &= gp_drive_read(design, node, diag);
	if ((node = gp_read_node(&r, "optics", false)))
		r.ok &= gp_optics_read(design, node, diag);
	r.ok &= gp_routing_read(design, &r, diag);
	if ((node = gp_read_node(&r, "electrical", false)))
		r.ok &= gp_electrical_read(design, node, diag);
	return gp_reader_end(&r);
}

struct gp_design *gp_design_from_spec(struct gp_spec *spec,
				      struct gp_diag *diag)
{
	struct gp_design *design = calloc(1, sizeof(*design));
	if (!design) {
		gp_spec_destroy(spec);
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	design->spec = spec;
	set_default_rules(&design->rules);
	gp_electrical_defaults(&design->electrical);
	size_t errors = diag->errors;
	if (!read_sections(design, diag) || diag->errors > errors) {
		gp_design_destroy(design);
		return NULL;
	}
	return design;
}

enum gp_plate gp_common_plate(const struct gp_design *design)
{
	return design->segment_plate == GP_PLATE_FRONT ? GP_PLATE_BACK
						       : GP_PLATE_FRONT;
}

GP_EXPORT void gp_design_destroy(struct gp_design *design)
{
	if (!design)
		return;
	free(design->blocks);
	gp_digits_free(design->digits, design->digit_count);
	gp_routing_destroy(design->routing);
	gp_icons_free(design);
	gp_spec_destroy(design->spec);
	free(design);
}

static struct gp_design *load(struct gp_spec *spec,
			      const char *const *overrides, size_t count,
			      struct gp_diag *diag)
{
	if (!spec)
		return NULL;
	if (count > GP_SPEC_MAX_OVERRIDES) {
		gp_diag_fail(diag, GP_MSG_OVER_LIMIT, NULL,
			     "%zu overrides (--set); the limit is "
			     "%d",
			     count, GP_SPEC_MAX_OVERRIDES);
		gp_spec_destroy(spec);
		return NULL;
	}
	bool ok = true;
	for (size_t i = 0; i < count; i++)
		ok &= gp_spec_override(spec, overrides[i], (int)i + 1, diag);
	if (!ok) {
		gp_spec_destroy(spec);
		return NULL;
	}
	return gp_design_from_spec(spec, diag);
}

GP_EXPORT struct gp_design *gp_design_load(const char *path,
					   const char *const *overrides,
					   size_t override_count,
					   struct gp_diag *diag)
{
	return load(gp_spec_load_file(path, diag), overrides, override_count,
		    diag);
}

GP_EXPORT struct gp_design *gp_design_load_buffer(const char *name,
						  const char *data,
						  size_t size,
						  const char *const *overrides,
						  size_t override_count,
						  struct gp_diag *diag)
{
	return load(gp_spec_load_buffer(name, data, size, diag), overrides,
		    override_count, diag);
}
