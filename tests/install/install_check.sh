#!/bin/sh
# install_check.sh - `cmake --install` into a fresh prefix, then the installed
# pieces used as a user would: the program runs, the manual page is there,
# and a program outside the tree compiles and links against the installed
# libplantsieve.a with `pkg-config --cflags --libs --static plantsieve`,
# reads a catalog through the library and prints floors that match the
# closed form. Usage: install_check.sh BUILD_DIR SOURCE_DIR CC LIBDIR [FLAGS]
# (FLAGS: the sanitizer flags the library was built with, for the link).
set -u
build=$(cd "$1" && pwd)
src=$(cd "$2" && pwd)
cc=$3
libdir=$4
flags=${5:-}
. "$src/tests/e2e/lib.sh"
prefix="$tmp/prefix"

cmake --install "$build" --prefix "$prefix" >"$tmp/install.log" 2>&1; check "cmake --install --prefix" 0 $?
[ "$fail" -eq 0 ] || cat "$tmp/install.log"
[ -x "$prefix/bin/plantsieve" ]; check "bin/plantsieve installed" 0 $?
"$prefix/bin/plantsieve" --version >"$tmp/out" 2>&1; check "installed plantsieve --version" 0 $?
"$prefix/bin/plantsieve" survey "$src/tests/install/one-pole-one-zero.yaml" >"$tmp/out" 2>&1; check "installed plantsieve survey" 0 $?
[ -s "$prefix/share/man/man1/plantsieve.1" ]; check "share/man/man1/plantsieve.1 installed" 0 $?
[ -s "$prefix/$libdir/libplantsieve.a" ]; check "$libdir/libplantsieve.a installed" 0 $?
for h in screen/screen.h batch/batch.h catalog/catalog.h core/diag.h report/reports.h; do
    [ -s "$prefix/include/plantsieve/$h" ]; check "include/plantsieve/$h installed" 0 $?
done
[ -z "$(find "$prefix/include" -name '*_internal.h' -o -name 'main.c' -o -path '*/cli*')" ]
check "no private header or command-line source installed" 0 $?
# Every installed header includes only installed headers or the system's.
for h in $(cd "$prefix/include/plantsieve" && find . -name '*.h' | sed 's|^\./||'); do
    for inc in $(sed -n 's/^#include "\(.*\)"/\1/p' "$prefix/include/plantsieve/$h"); do
        [ -f "$prefix/include/plantsieve/$inc" ]; check "$h includes $inc, which is installed" 0 $?
    done
done

pc="$prefix/$libdir/pkgconfig"
[ -s "$pc/plantsieve.pc" ]; check "$libdir/pkgconfig/plantsieve.pc installed" 0 $?
PKG_CONFIG_PATH="$pc" pkg-config --cflags --libs --static plantsieve >"$tmp/pkg" 2>&1; check "pkg-config knows plantsieve" 0 $?
cat "$tmp/pkg"
contains "Cflags name the installed headers" "$tmp/pkg" "include/plantsieve"
contains "Libs name the library" "$tmp/pkg" "-lplantsieve"
contains "static Libs name libcsv" "$tmp/pkg" "-lcsv"
contains "static Libs name GSL (Requires.private)" "$tmp/pkg" "-lgsl"
PKG_CONFIG_PATH="$pc" pkg-config --modversion plantsieve >"$tmp/ver" 2>&1
"$prefix/bin/plantsieve" --version | grep -qF "plantsieve $(cat "$tmp/ver")"; check "pc version is the program's" 0 $?

# The tiny program, compiled outside the tree with the flags pkg-config gives.
cp "$src/tests/install/use_library.c" "$tmp/use_library.c"
(cd "$tmp" && $cc -std=c17 -Wall -Wextra -Werror $flags -o use_library use_library.c \
    $(PKG_CONFIG_PATH="$pc" pkg-config --cflags --libs --static plantsieve)) >"$tmp/cc.log" 2>&1
check "use_library.c compiles and links against the installed library" 0 $?
[ -s "$tmp/cc.log" ] && cat "$tmp/cc.log"
"$tmp/use_library" "$src/tests/install/one-pole-one-zero.yaml" >"$tmp/run" 2>&1; check "use_library runs" 0 $?
cat "$tmp/run"
contains "one plant read" "$tmp/run" "entries 1 models 1 errors 0"
contains "one RHP pole, one RHP zero" "$tmp/run" "tilt-rig: rhp_poles 1 rhp_zeros 1"
# Chen (IEEE TAC 45(6), 2000) for one RHP pole p and one RHP zero z:
# Ms, Mt floor = (z + p)/(z - p); p = 1.7, z = 4.3 (the catalog).
awk '/^tilt-rig:/ { want = (4.3 + 1.7) / (4.3 - 1.7); ok = 1
     for (i = 1; i < NF; i++) if ($i == "ms_floor" || $i == "mt_floor") { d = $(i + 1) / want - 1; if (d < -1e-9 || d > 1e-9) ok = 0; n++ }
     exit !(ok && n == 2) }' "$tmp/run"
check "Ms and Mt floors are (z + p)/(z - p) within 1e-9" 0 $?
"$tmp/use_library" "$tmp/none.yaml" >"$tmp/run" 2>&1; check "use_library: a missing catalog fails" 4 $?
contains "use_library: the library's reason" "$tmp/run" "cannot open"

echo "install: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
