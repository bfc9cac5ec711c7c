/* test_complex_make.c - ps_complex_make keeps both parts bit for bit, with
 * gcc and with clang (where glibc's CMPLX is missing). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>

#include "core/complex_make.h"

static int same_bits(double a, double b) { return memcmp(&a, &b, sizeof a) == 0; }

/* The parts read back are the parts given, also where re + I*im would lose
 * them: I*inf gives a NaN real part (0*inf), and -0.0 + I*x may lose the sign
 * of the zero real part (C17 G.5.1 is optional; common practice). */
Test(complex_make, parts_bit_for_bit)
{
    const double parts[][2] = {{2.385, -0.4172}, {-0.0, 7.31e-5}, {3.97, -0.0},
                               {0.0, INFINITY}, {-INFINITY, 1.618}, {-0.0, -0.0},
                               {5e-324, -1.7976931348623157e308}};
    for (size_t i = 0; i < sizeof parts / sizeof parts[0]; i++) {
        double complex z = ps_complex_make(parts[i][0], parts[i][1]);
        cr_expect(same_bits(creal(z), parts[i][0]), "real part of case %zu", i);
        cr_expect(same_bits(cimag(z), parts[i][1]), "imaginary part of case %zu", i);
    }
}

/* Arithmetic on the result is ordinary complex arithmetic:
 * (2.385 - 0.4172i)(1.203 + 3.31i) = 2.385*1.203 + 0.4172*3.31
 *                                   + i(2.385*3.31 - 0.4172*1.203). */
Test(complex_make, arithmetic)
{
    double complex z = ps_complex_make(2.385, -0.4172) * ps_complex_make(1.203, 3.31);
    cr_expect(fabs(creal(z) - (2.385 * 1.203 + 0.4172 * 3.31)) < 1e-14);
    cr_expect(fabs(cimag(z) - (2.385 * 3.31 - 0.4172 * 1.203)) < 1e-14);
}
