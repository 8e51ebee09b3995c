/* jtree.c - cJSON documents built with allocation failures carried to the end (jtree.h). */
#include "jtree.h"

void jt_add(cJSON *obj, const char *name, cJSON *item, int *ok)
{
    if (!obj || !item || !(name ? cJSON_AddItemToObject(obj, name, item) : cJSON_AddItemToArray(obj, item))) {
        cJSON_Delete(item);
        *ok = 0;
    }
}
