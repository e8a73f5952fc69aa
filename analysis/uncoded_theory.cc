// Placeholder: implementation in progress.
#include "analysis/uncoded_theory.h"
