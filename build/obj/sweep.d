build/obj/sweep.o: src/sweep.c include/kphi/sweep.h include/kphi/eos.h \
 include/kphi/error.h include/kphi/species.h include/kphi/equil.h \
 include/kphi/rxnset.h include/kphi/report.h
include/kphi/sweep.h:
include/kphi/eos.h:
include/kphi/error.h:
include/kphi/species.h:
include/kphi/equil.h:
include/kphi/rxnset.h:
include/kphi/report.h:
