/* Our head ramp and catchment palette.
 *  - OKLab round trip: sRGB -> OKLab -> sRGB recovers the colour
 *    (Ottosson 2020 matrices, transcribed from memory; the round trip and
 *    the white point L = 1, a = b = 0 check the transcription).
 *  - Greyscale safety: CIE relative luminance (IEC 61966-2-1 / ITU-R BT.709
 *    weights) rises strictly along the ramp.
 *  - Perceptual uniformity: OKLab distances between equal steps of t differ
 *    by less than a factor 1.6 (our own design target). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include "io/map_ramp.h"

static void test_oklab_round_trip(void **state)
{
    (void)state;
    double white[3] = {1, 1, 1}, lab[3];
    gw_srgb_to_oklab(white, lab);
    assert_true(fabs(lab[0] - 1) < 1e-4 && fabs(lab[1]) < 1e-4 && fabs(lab[2]) < 1e-4);
    for (double L = 0.3; L <= 0.9; L += 0.1)
        for (double h = 0; h < 360; h += 45) {
            double rgb[3], back[3];
            gw_oklch_to_srgb(L, 0.04, h, rgb);   /* small chroma: in gamut */
            gw_srgb_to_oklab(rgb, back);
            double C = hypot(back[1], back[2]);
            assert_true(fabs(back[0] - L) < 2e-3);
            assert_true(fabs(C - 0.04) < 2e-3);
        }
}

static void test_ramp_monotonic_and_uniform(void **state)
{
    (void)state;
    enum { N = 64 };
    double prevY = -1, prevL = -1, lab0[3] = {0, 0, 0}, dmin = 1e9, dmax = 0;
    for (int i = 0; i <= N; i++) {
        double rgb[3], lab[3];
        gw_ramp_rgb((double)i / N, rgb);
        for (int k = 0; k < 3; k++) assert_true(rgb[k] >= 0 && rgb[k] <= 1);
        double Y = gw_srgb_luminance(rgb);
        gw_srgb_to_oklab(rgb, lab);
        assert_true(Y > prevY);
        assert_true(lab[0] > prevL);
        if (i > 0) {
            double d = sqrt(pow(lab[0] - lab0[0], 2) + pow(lab[1] - lab0[1], 2) + pow(lab[2] - lab0[2], 2));
            if (d < dmin) dmin = d;
            if (d > dmax) dmax = d;
        }
        prevY = Y;
        prevL = lab[0];
        for (int k = 0; k < 3; k++) lab0[k] = lab[k];
    }
    print_message("ramp: OKLab step min %.4f max %.4f\n", dmin, dmax);
    assert_true(dmax / dmin < 1.6);
}

/* Neighbouring palette entries differ in lightness, so adjacent catchments
 * stay apart in greyscale. */
static void test_palette(void **state)
{
    (void)state;
    for (int i = 0; i < GW_PALETTE_SIZE; i++) {
        double a[3], b[3], la[3], lb[3];
        gw_palette_rgb(i, a);
        gw_palette_rgb(i + 1, b);
        gw_srgb_to_oklab(a, la);
        gw_srgb_to_oklab(b, lb);
        assert_true(fabs(la[0] - lb[0]) > 0.1);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_oklab_round_trip),
        cmocka_unit_test(test_ramp_monotonic_and_uniform),
        cmocka_unit_test(test_palette),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
