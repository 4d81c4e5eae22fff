build/obj/species.o: src/species.c include/kphi/species.h \
 include/kphi/error.h src/internal.h src/yamlutil.h
include/kphi/species.h:
include/kphi/error.h:
src/internal.h:
src/yamlutil.h:
