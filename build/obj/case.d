build/obj/case.o: src/case.c include/kphi/case.h include/kphi/eos.h \
 include/kphi/error.h include/kphi/species.h include/kphi/rxnset.h \
 src/internal.h include/kphi/thermo.h include/kphi/units.h src/yamlutil.h
include/kphi/case.h:
include/kphi/eos.h:
include/kphi/error.h:
include/kphi/species.h:
include/kphi/rxnset.h:
src/internal.h:
include/kphi/thermo.h:
include/kphi/units.h:
src/yamlutil.h:
