/* complex_make.h - a double complex from its two parts, for every compiler:
 * glibc defines C11's CMPLX only for gcc, so clang builds would not link. */
#ifndef PS_COMPLEX_MAKE_H
#define PS_COMPLEX_MAKE_H

/* Include after any GSL header, so that gsl_complex stays a struct. */
#include <complex.h>

/* The complex number re + i*im, with both parts kept bit for bit (signed
 * zeros, infinities and NaNs included), which re + I*im does not guarantee.
 * C17 6.2.5p13 gives a complex type the representation of an array of two
 * reals (real part first), so the union below is the portable construction
 * (used with every compiler, so that gcc and clang run the same code). */
static inline double complex ps_complex_make(double re, double im)
{
    union {
        double parts[2];
        double complex z;
    } u = {.parts = {re, im}};
    return u.z;
}

#endif
