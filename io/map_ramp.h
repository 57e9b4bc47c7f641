/* Colours of the maps: our own continuous ramp for heads and a categorical
 * palette for catchments.  Both are defined in the OKLab colour space
 * (Ottosson 2020), where equal steps look equally different; docs/maps.md
 * gives the definitions and the reasons. */
#ifndef GW_MAP_RAMP_H
#define GW_MAP_RAMP_H

/* Head ramp at t in [0, 1] (clamped): sRGB components in [0, 1].  Low t is
 * dark slate blue, high t pale sand; lightness rises monotonically so the
 * order survives greyscale printing and every colour-vision deficiency. */
void gw_ramp_rgb(double t, double rgb[3]);

/* Categorical colour i (any i >= 0; the palette repeats after
 * GW_PALETTE_SIZE) for catchments: mid-light tints that keep dark line work
 * and labels readable on top. */
enum { GW_PALETTE_SIZE = 8 };
void gw_palette_rgb(int i, double rgb[3]);

/* OKLab lightness/chroma/hue (degrees) -> sRGB in [0, 1]; chroma is reduced
 * until the colour fits the sRGB gamut. */
void gw_oklch_to_srgb(double L, double C, double hdeg, double rgb[3]);

/* sRGB in [0, 1] -> OKLab (for tests and docs). */
void gw_srgb_to_oklab(const double rgb[3], double lab[3]);

/* CIE relative luminance Y of an sRGB colour (what a greyscale print keeps). */
double gw_srgb_luminance(const double rgb[3]);

#endif
