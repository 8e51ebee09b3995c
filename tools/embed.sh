#!/bin/sh
# embed.sh FILE SYMBOL - print a C file defining `const char SYMBOL[]` with FILE's bytes
# and a NUL. Uses od(1) from coreutils, so no xxd is needed.
set -e
printf '/* generated from %s by tools/embed.sh - do not edit */\n' "$1"
printf 'const char %s[] = {\n' "$2"
od -An -v -tx1 "$1" | sed -e 's/ *\([0-9a-f][0-9a-f]\)/0x\1,/g'
printf '0x00};\n'
