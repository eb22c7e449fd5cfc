/* The pipeline: layout, routing and checks into a build; writers from it. */
#include "build.h"
#include "preview.h"

#include "gerber.h"
#include "output.h"
#include "proof.h"
#include "staged-file.h"
#include "units.h"

#include "gp-config.h"

#include <glib.h>
#include <json-c/json.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

GP_EXPORT const char *gp_version(void)
{
	return GP_VERSION;
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

static void write_summary_json(struct gp_build *build);

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

static void stage(const struct gp_build *build, const char *name)
{
	if (build->progress)
		build->progress(name, build->progress_data);
}

/* Backstop for GP_MAX_NETS over every kind of element: the blocks are
 * checked when read, digits and icons are bounded by their own limits,
 * and this keeps the sum bounded before routing and checks. */
static bool check_net_count(const struct gp_build *build,
			    struct gp_diag *diag)
{
	if (build->art.net_count <= GP_MAX_NETS)
		return true;
	return gp_diag_error(diag, NULL,
			     "%s: the design needs %zu commons and segments; "
			     "the limit is %d", build->design->spec->file,
			     build->art.net_count, GP_MAX_NETS);
}

/* Moves the messages of scratch into diag: all of them when the drive
 * could not be resolved, else the warnings and notes only (an empty Vop
 * window is a finding of the check stage, not bad input). */
static void forward_drive_messages(struct gp_diag *scratch, bool resolved,
				   struct gp_diag *diag)
{
	for (size_t i = 0; i < scratch->count; i++) {
		const struct gp_diag_entry *e = &scratch->entries[i];
		if (e->severity == GP_SEVERITY_ERROR && resolved)
			continue;
		gp_diag_copy(diag, e);
	}
}

/* The drive against the commons the layout made: the one place N comes
 * from for the drive spec, the checks (row time, RC), the proof and the
 * summary.  A drive that cannot be computed fails the build at the
 * place of its cause. */
static bool resolve_drive(struct gp_build *build, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	if (!d->drive.has_drive && !d->drive.has_optics)
		return true;
	struct gp_diag scratch;
	gp_diag_init(&scratch);
	bool ok = gp_drive_resolve_spec(&d->drive, build->art.common_count,
					d->spec ? d->spec->file : NULL,
					&build->drive, &scratch);
	build->drive.part = d->part;
	build->drive.revision = d->revision;
	forward_drive_messages(&scratch, ok, diag);
	gp_diag_finish(&scratch);
	build->has_drive = ok;
	return ok;
}

static struct gp_build *build_new(
	const struct gp_design *design,
	void (*progress)(const char *stage, void *data), void *data,
	struct gp_diag *diag)
{
	struct gp_build *build = calloc(1, sizeof(*build));
	if (!build) {
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	build->design = design;
	build->outputs = GP_OUTPUT_ALL;
	build->progress = progress;
	build->progress_data = data;
	gp_artwork_init(&build->art);
	gp_buffer_init(&build->summary);
	gp_buffer_init(&build->notes);
	gp_buffer_init(&build->inputs);
	gp_buffer_init(&build->written);
	gp_buffer_init(&build->json);
	gp_check_report_init(&build->checks);
	gp_buffer_init(&build->check_text);
	gp_buffer_init(&build->check_json);
	return build;
}

/* The layout stages, which make every net, then the drive on their
 * commons. */
static bool lay_out(struct gp_build *build, struct gp_diag *diag)
{
	return gp_blocks_layout(build, diag) &&
	       gp_digits_layout(build, diag) &&
	       gp_icons_layout(build, diag) &&
	       resolve_drive(build, diag);
}

GP_EXPORT struct gp_build *gp_build_create_with_progress(
	const struct gp_design *design,
	void (*progress)(const char *stage, void *data), void *data,
	struct gp_diag *diag)
{
	struct gp_build *build = build_new(design, progress, data, diag);
	if (!build)
		return NULL;
	/* pipeline order: blocks, digits, icons, drive, routing, outlines,
	 * checks */
	stage(build, "layout");
	if (!lay_out(build, diag) ||
	    !gp_route_layout(build, diag) ||
	    !gp_outlines_layout(build, diag) ||
	    !check_net_count(build, diag)) {
		gp_build_destroy(build);
		return NULL;
	}
	stage(build, "checks");
	if (!gp_build_check(build, diag)) {
		gp_build_destroy(build);
		return NULL;
	}
	write_summary(build);
	write_summary_json(build);
	return build;
}

GP_EXPORT struct gp_build *gp_build_create(const struct gp_design *design,
					   struct gp_diag *diag)
{
	return gp_build_create_with_progress(design, NULL, NULL, diag);
}

bool gp_design_drive(const struct gp_design *design,
		     struct gp_drive_report *report, struct gp_diag *diag)
{
	memset(report, 0, sizeof(*report));
	struct gp_build *build = build_new(design, NULL, NULL, diag);
	if (!build)
		return false;
	bool ok = gp_blocks_layout(build, diag) &&
		  gp_digits_layout(build, diag) &&
		  gp_icons_layout(build, diag) &&
		  gp_drive_resolve_spec(&design->drive, build->art.common_count,
					design->spec ? design->spec->file : NULL,
					report, diag);
	report->part = design->part;
	report->revision = design->revision;
	gp_build_destroy(build);
	return ok;
}

GP_EXPORT char *gp_drive_report_create(const struct gp_design *design,
				       enum gp_drive_output output,
				       bool *feasible, struct gp_diag *diag)
{
	struct gp_drive_report report;
	*feasible = true;
	if (!gp_design_drive(design, &report, diag))
		return NULL;
	*feasible = report.result.feasible;
	struct gp_buffer out;
	gp_buffer_init(&out);
	if (output == GP_DRIVE_JSON)
		gp_drive_format_json(&report, &out);
	else
		gp_drive_format(&report, &out);
	if (out.failed || !out.data) {
		gp_buffer_finish(&out);
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	return out.data;
}

GP_EXPORT void gp_build_destroy(struct gp_build *build)
{
	if (!build)
		return;
	gp_artwork_finish(&build->art);
	gp_buffer_finish(&build->summary);
	gp_buffer_finish(&build->notes);
	gp_buffer_finish(&build->inputs);
	gp_buffer_finish(&build->written);
	gp_buffer_finish(&build->json);
	gp_check_report_finish(&build->checks);
	gp_buffer_finish(&build->check_text);
	gp_buffer_finish(&build->check_json);
	free(build->blocks);
	gp_digit_rows_free(build->digit_rows, build->design->digit_count);
	free(build->ends);
	free(build->pins);
	gp_show_destroy(build->show);
	free(build);
}

GP_EXPORT void gp_build_set_depfile(struct gp_build *build, const char *path)
{
	build->depfile = path;
}

GP_EXPORT void gp_build_set_epoch(struct gp_build *build, int64_t epoch)
{
	build->has_epoch = true;
	build->epoch = epoch;
}

static const char *const output_kinds[] = {
	"gerber", "proof", "pins", "firmware", "report", NULL,
};

/* The kinds listed, as enum gp_output_kind bits; 0 with a message when
 * the list is empty, or names a kind twice or one that is not known. */
static unsigned parse_kinds(const char *kinds, struct gp_diag *diag)
{
	unsigned selected = 0;
	const char *p = kinds;
	if (!*p) {
		gp_diag_error(diag, NULL, "no kind of output given; expected a "
			      "list of gerber, proof, pins, firmware, report");
		return 0;
	}
	for (;;) {
		size_t length = strcspn(p, ",");
		int found = -1;
		for (int i = 0; output_kinds[i] && found < 0; i++)
			if (strlen(output_kinds[i]) == length &&
			    strncmp(output_kinds[i], p, length) == 0)
				found = i;
		if (found < 0) {
			gp_diag_error(diag, NULL,
				      "unknown kind of output '%.*s'; "
				      "expected a list of gerber, proof, "
				      "pins, firmware, report",
				      (int)length, p);
			return 0;
		}
		if (selected & (1u << found)) {
			gp_diag_error(diag, NULL, "'%s' is listed twice",
				      output_kinds[found]);
			return 0;
		}
		selected |= 1u << found;
		if (!p[length])
			return selected;
		p += length + 1;
	}
}

GP_EXPORT bool gp_output_kinds_check(const char *kinds, struct gp_diag *diag)
{
	return parse_kinds(kinds, diag) != 0;
}

GP_EXPORT bool gp_build_select(struct gp_build *build, const char *kinds,
			       struct gp_diag *diag)
{
	unsigned selected = parse_kinds(kinds, diag);
	if (selected) {
		build->outputs = selected;
		build->outputs_chosen = true;
	}
	return selected != 0;
}

GP_EXPORT const char *gp_build_inputs(const struct gp_build *build)
{
	return build->inputs.data ? build->inputs.data : "";
}

GP_EXPORT const char *gp_build_summary(const struct gp_build *build)
{
	return build->summary.data ? build->summary.data : "";
}

GP_EXPORT const char *gp_build_written(const struct gp_build *build)
{
	return build->written.data ? build->written.data : "";
}

static bool add_gerber_files(const struct gp_build *build,
			     struct gp_output_set *set,
			     const struct gp_gerber_info *info,
			     struct gp_diag *diag);

static bool add_gerbers(const struct gp_build *build,
			struct gp_output_set *set, struct gp_diag *diag)
{
	char date[40];
	struct gp_gerber_info info = {
		.part_number = build->design->part,
		.version = GP_VERSION,
		.creation_date = NULL,
	};
	if (build->has_epoch &&
	    gp_gerber_format_date(date, sizeof(date), build->epoch))
		info.creation_date = date;
	if (!gp_build_wants(build, GP_OUTPUT_GERBER))
		return true;
	info.revision = build->design->revision;
	struct gp_gerber_pin *pins =
		calloc(build->pin_count ? build->pin_count : 1, sizeof(*pins));
	if (!pins)
		return gp_diag_oom(diag, NULL);
	for (size_t i = 0; i < build->pin_count; i++) {
		const struct gp_pin *p = &build->pins[i];
		pins[i] = (struct gp_gerber_pin){
			p->box, p->number,
			p->ledge >= 0 && (size_t)p->ledge < build->ledge_count
				? build->ledges[p->ledge].name
				: NULL };
	}
	info.pins = pins;
	info.pin_count = build->pin_count;
	bool ok = add_gerber_files(build, set, &info, diag);
	free(pins);
	return ok;
}

/* One Gerber file per layer that has shapes, in the set of one face. */
static bool add_gerber_face(const struct gp_build *build,
			    struct gp_output_set *set,
			    const struct gp_gerber_info *info,
			    struct gp_diag *diag)
{
	bool coated = info->face == GP_GERBER_FACE_COATED;
	for (int layer = 0; layer < GP_LAYER_COUNT; layer++) {
		bool used = false;
		for (size_t i = 0; i < build->art.shape_count && !used; i++)
			used = build->art.shapes[i].layer == (enum gp_layer)layer;
		if (!used)
			continue;
		char name[64];
		snprintf(name, sizeof(name), "%s%s.gbr",
			 gp_layer_name((enum gp_layer)layer),
			 coated ? "-coated" : "");
		struct gp_buffer *out = gp_output_add(set, name, diag);
		char why[320];
		if (!out)
			return false;
		if (!gp_gerber_write_why(out, &build->art,
					 (enum gp_layer)layer, info, why,
					 sizeof(why)))
			return gp_diag_error(diag, NULL, "%s: cannot write the "
					     "Gerber file: %s", name, why);
	}
	return true;
}

/* The viewer's set, the coated faces' set, or both (gp_build_set_faces);
 * the front plate's layers in the coated set are mirrored about the
 * vertical line through the front plate's centre. */
static bool add_gerber_files(const struct gp_build *build,
			     struct gp_output_set *set,
			     const struct gp_gerber_info *info,
			     struct gp_diag *diag)
{
	unsigned faces = build->faces ? build->faces : GP_FACES_VIEWER;
	struct gp_gerber_info face = *info;
	struct gp_box front = build->design->front.box;
	face.mirror_axis = front.x0 + (front.x1 - front.x0) / 2;
	face.face = GP_GERBER_FACE_VIEWER;
	if ((faces & GP_FACES_VIEWER) &&
	    !add_gerber_face(build, set, &face, diag))
		return false;
	face.face = GP_GERBER_FACE_COATED;
	return !(faces & GP_FACES_COATED) ||
	       add_gerber_face(build, set, &face, diag);
}

static const char *const face_names[] = { "viewer", "coated", "both", NULL };

/* "viewer", "coated" or "both" as GP_FACES_* bits; 0 with a message for
 * anything else. */
static unsigned parse_faces(const char *which, struct gp_diag *diag)
{
	for (int i = 0; face_names[i]; i++)
		if (strcmp(which, face_names[i]) == 0)
			return (unsigned)i + 1;
	gp_diag_error(diag, NULL, "unknown set of Gerber files '%s'; expected "
		      "viewer, coated or both", which);
	return 0;
}

GP_EXPORT bool gp_faces_check(const char *which, struct gp_diag *diag)
{
	return parse_faces(which, diag) != 0;
}

GP_EXPORT bool gp_build_set_faces(struct gp_build *build, const char *which,
				  struct gp_diag *diag)
{
	unsigned faces = parse_faces(which, diag);
	if (faces)
		build->faces = faces;
	return faces != 0;
}

static bool add_proof(const struct gp_build *build,
		      struct gp_output_set *set, struct gp_diag *diag)
{
	if (!gp_build_wants(build, GP_OUTPUT_PROOF))
		return true;
	struct gp_buffer *out = gp_output_add(set, "proof.pdf", diag);
	return out && gp_proof_write(out, build, diag);
}

/* checksums.sha256 in the form "sha256sum -c" reads: hash, two spaces,
 * name.  Written last, over every other output. */
static bool add_checksums(struct gp_output_set *set, struct gp_diag *diag)
{
	size_t count = set->count;
	struct gp_buffer *out = gp_output_add(set, "checksums.sha256", diag);
	if (!out)
		return false;
	for (size_t i = 0; i < count; i++) {
		const struct gp_output_file *f = &set->files[i];
		gchar *hex = g_compute_checksum_for_data(
			G_CHECKSUM_SHA256, (const guchar *)f->content.data,
			f->content.size);
		if (!hex)
			return gp_diag_oom(diag, NULL);
		gp_buffer_printf(out, "%s  %s\n", hex, f->name);
		g_free(hex);
	}
	return !out->failed || gp_diag_oom(diag, NULL);
}

bool gp_build_outputs(const struct gp_build *build,
		      struct gp_output_set *set,
		      struct gp_diag *diag)
{
	return add_gerbers(build, set, diag) &&
	       add_proof(build, set, diag) &&
	       gp_route_write(build, set, diag) &&
	       gp_build_add_check_reports(build, set, diag) &&
	       add_checksums(set, diag);
}

struct gp_outputs {
	struct gp_output_set set;
};

GP_EXPORT struct gp_outputs *gp_build_render(const struct gp_build *build,
					     struct gp_diag *diag)
{
	struct gp_outputs *outputs = calloc(1, sizeof(*outputs));
	if (!outputs) {
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	gp_output_set_init(&outputs->set);
	if (!gp_build_outputs(build, &outputs->set, diag)) {
		gp_outputs_destroy(outputs);
		return NULL;
	}
	return outputs;
}

GP_EXPORT void gp_outputs_destroy(struct gp_outputs *outputs)
{
	if (!outputs)
		return;
	gp_output_set_finish(&outputs->set);
	free(outputs);
}

GP_EXPORT size_t gp_outputs_count(const struct gp_outputs *outputs)
{
	return outputs->set.count;
}

GP_EXPORT const char *gp_outputs_name(const struct gp_outputs *outputs,
				      size_t i)
{
	return i < outputs->set.count ? outputs->set.files[i].name : NULL;
}

GP_EXPORT const void *gp_outputs_data(const struct gp_outputs *outputs,
				      size_t i, size_t *size)
{
	if (i >= outputs->set.count) {
		*size = 0;
		return NULL;
	}
	const struct gp_buffer *content = &outputs->set.files[i].content;
	*size = content->size;
	return content->data ? content->data : "";
}

GP_EXPORT const void *gp_outputs_find(const struct gp_outputs *outputs,
				      const char *name, size_t *size)
{
	for (size_t i = 0; i < outputs->set.count; i++)
		if (strcmp(outputs->set.files[i].name, name) == 0)
			return gp_outputs_data(outputs, i, size);
	*size = 0;
	return NULL;
}

GP_EXPORT bool gp_build_write(struct gp_build *build, const char *folder,
			      struct gp_diag *diag)
{
	struct gp_output_set set;
	gp_output_set_init(&set);
	stage(build, "writing");
	/* the dependency file is staged first and put in place last, so
	 * that when it cannot be written nothing is */
	struct gp_staged_file depfile = { NULL, NULL };
	bool ok = gp_build_outputs(build, &set, diag) &&
		  (!build->depfile ||
		   gp_depfile_stage(build, &set, folder, &depfile, diag)) &&
		  gp_output_commit(&set, folder, diag) &&
		  (!build->depfile || gp_staged_file_commit(&depfile, diag));
	gp_staged_file_discard(&depfile);
	build->written.size = 0;
	for (size_t i = 0; ok && i < set.count; i++) {
		gp_buffer_printf(&build->written, "%s\n", set.files[i].name);
		gp_buffer_printf(&build->summary, "wrote: %s/%s\n", folder,
				 set.files[i].name);
	}
	gp_output_set_finish(&set);
	write_summary_json(build);
	return ok;
}

static json_object *nets_json(const struct gp_build *build)
{
	size_t commons, segments;
	count_nets(&build->art, &commons, &segments);
	json_object *o = json_object_new_object();
	json_object_object_add(o, "commons", json_object_new_int64((int64_t)commons));
	json_object_object_add(o, "segments",
			       json_object_new_int64((int64_t)segments));
	json_object_object_add(o, "pixels",
			       json_object_new_int64((int64_t)build->art.pixel_count));
	return o;
}

static json_object *lines_json(const char *text)
{
	json_object *list = json_object_new_array();
	for (const char *p = text ? text : ""; *p;) {
		const char *end = strchr(p, '\n');
		if (!end)
			break;
		json_object_array_add(list, json_object_new_string_len(
						    p, (int)(end - p)));
		p = end + 1;
	}
	return list;
}

static json_object *plate_json(const struct gp_plate_spec *plate)
{
	json_object *o = json_object_new_object();
	json_object_object_add(o, "width_mm", json_object_new_double(
					 gp_mm(gp_box_width(plate->box))));
	json_object_object_add(o, "height_mm", json_object_new_double(
					  gp_mm(gp_box_height(plate->box))));
	return o;
}

/* The summary as JSON into build->json: made when the build is and again
 * after every gp_build_write (its list of files). */
static void write_summary_json(struct gp_build *build)
{
	const struct gp_design *d = build->design;
	json_object *o = json_object_new_object();
	json_object_object_add(o, "part", json_object_new_string(d->part));
	json_object_object_add(o, "revision",
			       json_object_new_string(d->revision));
	json_object_object_add(o, "front", plate_json(&d->front));
	json_object_object_add(o, "back", plate_json(&d->back));
	json_object *blocks = json_object_new_array();
	for (size_t i = 0; i < d->block_count; i++)
		json_object_array_add(blocks,
				      json_object_new_string(d->blocks[i].name));
	json_object_object_add(o, "blocks", blocks);
	json_object_object_add(o, "nets", nets_json(build));
	json_object *overrides = json_object_new_array();
	for (size_t i = 0; i < d->spec->override_count; i++)
		json_object_array_add(overrides, json_object_new_string(
							 d->spec->overrides[i]));
	json_object_object_add(o, "overrides", overrides);
	json_object_object_add(o, "notes", lines_json(build->notes.data));
	json_object_object_add(o, "files", lines_json(build->written.data));
	build->json.size = 0;
	gp_buffer_puts(&build->json, json_object_to_json_string_ext(
					      o, JSON_C_TO_STRING_PRETTY |
							 JSON_C_TO_STRING_NOSLASHESCAPE));
	gp_buffer_puts(&build->json, "\n");
	json_object_put(o);
}

GP_EXPORT const char *gp_build_summary_json(const struct gp_build *build)
{
	return build->json.data ? build->json.data : "{}\n";
}
