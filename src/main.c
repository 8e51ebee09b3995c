/* main.c - placeholder until the CLI lands. */
#include <stdio.h>
int main(void) { puts("haloledger"); return 0; }
