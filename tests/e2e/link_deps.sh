#!/bin/sh
# link_deps.sh - every library on the link lines (`make print-link-flags`: the pkg-config data of
# libxlsxwriter, cJSON and CUnit, plus -lm) is found by the linker and its development file
# belongs to a Debian package that `make deps` installs (tools/deps.sh --list). This is what let
# `-lz` slip through on machines that happened to have zlib1g-dev (docs/library-notes.md): here
# the owning package is read from dpkg, so the check holds even where the file is installed.
cd "${HL_ROOT:-$(dirname "$0")/../..}" || exit 1
CC=${CC:-gcc}
flags=$(make -s --no-print-directory print-link-flags) || { echo "link_deps: FAILED: make print-link-flags"; exit 1; }
listed=$(sh tools/deps.sh --list)
fail=0; n=0
case " $flags " in *" -lxlsxwriter "*) ;; *)
    echo "link_deps: -lxlsxwriter missing from the link line: pkg-config data not found?"; fail=1 ;;
esac
for f in $flags; do
    case "$f" in -l*) ;; *) continue ;; esac
    name=${f#-l}; n=$((n + 1))
    file=""
    for ext in so a; do
        p=$($CC -print-file-name="lib$name.$ext")
        [ "$p" != "lib$name.$ext" ] && { file=$p; break; }
    done
    if [ -z "$file" ]; then
        echo "FAIL $f: the linker finds no lib$name.so or lib$name.a"; fail=1; continue
    fi
    # dpkg records /usr/lib/<triplet>/libX.so: resolve the folder, keep the dev symlink itself
    path="$(cd "$(dirname "$file")" && pwd -P)/$(basename "$file")"
    pkg=$(dpkg-query -S "$path" 2>/dev/null | sed -n '1s/:.*//p')
    if [ -z "$pkg" ]; then
        echo "FAIL $f: $path belongs to no Debian package"; fail=1; continue
    fi
    if printf '%s\n' $listed | grep -qx "$pkg"; then
        echo "ok   $f: $path from $pkg"
    else
        echo "FAIL $f: $path comes from $pkg, which tools/deps.sh does not install"; fail=1
    fi
done
[ "$n" -gt 0 ] || { echo "link_deps: no -l flag found"; fail=1; }
if [ $fail -eq 0 ]; then echo "link_deps: $n link libraries, each from a package make deps installs"; exit 0; fi
echo "link_deps: FAILED"; exit 1
