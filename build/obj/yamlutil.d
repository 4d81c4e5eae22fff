build/obj/yamlutil.o: src/yamlutil.c src/yamlutil.h include/kphi/error.h \
 src/internal.h
src/yamlutil.h:
include/kphi/error.h:
src/internal.h:
