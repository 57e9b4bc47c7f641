/* Map colours in OKLab.  OKLab conversion matrices: Ottosson (2020), "A
 * perceptual color space for image processing" (from memory, checked by the
 * round trip in tests/test_map_ramp.c); sRGB transfer curve: IEC 61966-2-1. */
#include "map_ramp.h"

#include <math.h>

static const double PI = 3.14159265358979323846;

static double srgb_encode(double c)
{
    if (c <= 0.0031308) return 12.92 * c;
    return 1.055 * pow(c, 1.0 / 2.4) - 0.055;
}

static double srgb_decode(double c)
{
    if (c <= 0.04045) return c / 12.92;
    return pow((c + 0.055) / 1.055, 2.4);
}

/* OKLab -> linear sRGB. */
static void oklab_to_linear(double L, double a, double b, double out[3])
{
    double l_ = L + 0.3963377774 * a + 0.2158037573 * b;
    double m_ = L - 0.1055613458 * a - 0.0638541728 * b;
    double s_ = L - 0.0894841775 * a - 1.2914855480 * b;
    double l = l_ * l_ * l_, m = m_ * m_ * m_, s = s_ * s_ * s_;
    out[0] = 4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s;
    out[1] = -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s;
    out[2] = -0.0041960863 * l - 0.7034186147 * m + 1.7076147010 * s;
}

void gw_srgb_to_oklab(const double rgb[3], double lab[3])
{
    double r = srgb_decode(rgb[0]), g = srgb_decode(rgb[1]), b = srgb_decode(rgb[2]);
    double l = 0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b;
    double m = 0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b;
    double s = 0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b;
    l = cbrt(l); m = cbrt(m); s = cbrt(s);
    lab[0] = 0.2104542553 * l + 0.7936177850 * m - 0.0040720468 * s;
    lab[1] = 1.9779984951 * l - 2.4285922050 * m + 0.4505937099 * s;
    lab[2] = 0.0259040371 * l + 0.7827717662 * m - 0.8086757660 * s;
}

double gw_srgb_luminance(const double rgb[3])
{
    return 0.2126 * srgb_decode(rgb[0]) + 0.7152 * srgb_decode(rgb[1]) + 0.0722 * srgb_decode(rgb[2]);
}

static int in_gamut(const double lin[3])
{
    const double eps = 1e-9;
    for (int i = 0; i < 3; i++)
        if (lin[i] < -eps || lin[i] > 1.0 + eps) return 0;
    return 1;
}

void gw_oklch_to_srgb(double L, double C, double hdeg, double rgb[3])
{
    double h = hdeg * PI / 180.0, lin[3];
    /* Bisection on chroma keeps lightness and hue, which carry the meaning. */
    oklab_to_linear(L, C * cos(h), C * sin(h), lin);
    if (!in_gamut(lin)) {
        double lo = 0.0, hi = C;
        for (int it = 0; it < 40; it++) {
            double mid = 0.5 * (lo + hi);
            oklab_to_linear(L, mid * cos(h), mid * sin(h), lin);
            if (in_gamut(lin)) lo = mid; else hi = mid;
        }
        oklab_to_linear(L, lo * cos(h), lo * sin(h), lin);
    }
    for (int i = 0; i < 3; i++) {
        double c = lin[i] < 0 ? 0 : lin[i] > 1 ? 1 : lin[i];
        rgb[i] = srgb_encode(c);
    }
}

/* The head ramp ("slate to sand"): lightness rises linearly from 0.36 to
 * 0.95, hue turns from 255 deg (slate blue) through teal and sage to
 * 95 deg (sand), chroma peaks mid-way at a moderate 0.10 so that the
 * overlays (streams, wells, labels) stay the most saturated things on the
 * map.  The blue-yellow axis is the one all common colour-vision
 * deficiencies keep. */
void gw_ramp_rgb(double t, double rgb[3])
{
    if (!(t >= 0)) t = 0;   /* also catches NAN */
    if (t > 1) t = 1;
    double L = 0.36 + 0.59 * t;
    double C = 0.055 + 0.045 * sin(PI * t);
    double h = 255.0 - 160.0 * t;
    gw_oklch_to_srgb(L, C, h, rgb);
}

/* Catchment palette: hues a golden angle apart so neighbours in the list
 * differ strongly, lightness alternating 0.70 / 0.84 so adjacent
 * catchments also differ in greyscale. */
void gw_palette_rgb(int i, double rgb[3])
{
    if (i < 0) i = -i;
    i %= GW_PALETTE_SIZE;
    double h = fmod(30.0 + 137.508 * i, 360.0);
    double L = (i % 2 == 0) ? 0.84 : 0.70;
    double C = (i % 2 == 0) ? 0.07 : 0.09;
    gw_oklch_to_srgb(L, C, h, rgb);
}
