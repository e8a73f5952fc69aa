// Placeholder: implementation in progress.
#include "analysis/capacity.h"
