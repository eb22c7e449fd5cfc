/* Exact lengths: decimal millimetres <-> integer nanometres. */
#ifndef GP_UNITS_H
#define GP_UNITS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#define GP_NM_PER_MM INT64_C(1000000)
/* Largest length accepted anywhere: 10 m.  Keeps every product of two
 * coordinates (areas in nm^2) far inside int64_t. */
#define GP_LENGTH_MAX (INT64_C(10000) * GP_NM_PER_MM)

/* Parse a decimal millimetre value ("12.5", "-0.000001", "+3") straight to
 * nanometres without floating point.  At most 6 decimals; no exponent; no
 * spaces; |value| <= GP_LENGTH_MAX.  On failure returns false and sets
 * *why to a static text saying what is wrong. */
bool gp_parse_mm(const char *text, int64_t *nm, const char **why);

/* Write nm as millimetres with exactly 6 decimals ("-1.250000"). */
void gp_format_mm(char *buffer, size_t size, int64_t nm);
/* Write nm as millimetres with trailing zeros removed ("1.25", "3"). */
void gp_format_mm_short(char *buffer, size_t size, int64_t nm);

static inline double gp_mm(int64_t nm) { return (double)nm / 1e6; }

/* Checked arithmetic: false on overflow. */
static inline bool gp_add_nm(int64_t a, int64_t b, int64_t *out)
{
	return !__builtin_add_overflow(a, b, out);
}
static inline bool gp_mul_nm(int64_t a, int64_t b, int64_t *out)
{
	return !__builtin_mul_overflow(a, b, out);
}

#endif
