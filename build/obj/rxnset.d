build/obj/rxnset.o: src/rxnset.c include/kphi/rxnset.h \
 include/kphi/error.h include/kphi/species.h src/internal.h \
 src/yamlutil.h
include/kphi/rxnset.h:
include/kphi/error.h:
include/kphi/species.h:
src/internal.h:
src/yamlutil.h:
