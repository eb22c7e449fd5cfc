/* The pipeline: runs the stages on the build (lib/layout/stage.h) in
 * order and renders the outputs. */
#ifndef GP_BUILD_H
#define GP_BUILD_H

#include "artwork.h"
#include "buffer.h"
#include "check.h"
#include "diag.h"
#include "digits.h"
#include "drive.h"
#include "layout.h"
#include "model.h"
#include "output.h"
#include "pinmap.h"
#include "route.h"
#include "stage.h"

struct gp_staged_file;
/* Writes the dependency file for set, to be committed into folder, under
 * a temporary name beside build->depfile (depfile.c). */
bool gp_depfile_stage(const struct gp_build *build,
		      const struct gp_output_set *set, const char *folder,
		      struct gp_staged_file *file, struct gp_diag *diag);

/* Renders every output of the build into set, in memory, touching no
 * file: gp_build_write is this followed by gp_output_commit.  Every
 * writer is called from here, so that the outputs in memory and on disk
 * are the same set.  The fuzz
 * harness and tests use it to run the whole pipeline without a disk. */
bool gp_build_outputs(const struct gp_build *build,
		      struct gp_output_set *set,
		      struct gp_diag *diag);

/* The drive of a design on the commons its layout makes: runs the
 * layout stages (blocks, digits, icons) on a scratch build and resolves
 * the drive against their COM nets, with or without a drive section
 * (gp_drive_resolve_spec; an empty window is an error in diag and
 * report->result.feasible false).  For 'glassplot drive' and tests. */
bool gp_design_drive(const struct gp_design *design,
		     struct gp_drive_report *report, struct gp_diag *diag);

#endif
