/* The pin table (pins.csv) and the firmware map header (glass-map.h),
 * written from the routed build (pinmap.c). */
#ifndef GP_PINMAP_H
#define GP_PINMAP_H

#include "buffer.h"
#include "diag.h"
#include "output.h"
#include "stage.h"

#include <stdbool.h>

/* Adds pins.csv and the firmware map header to set when the build has
 * pins. */
bool gp_route_write(const struct gp_build *build, struct gp_output_set *set,
		    struct gp_diag *diag);

/* The two tables on their own (for the tests). */
bool gp_pins_csv(const struct gp_build *build, struct gp_buffer *out);
bool gp_firmware_header(const struct gp_build *build, struct gp_buffer *out);

#endif
