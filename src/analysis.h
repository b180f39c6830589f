/* analysis.h: the interface between the model fit (anova.c) and the checks of its
 * assumptions (diagnose.c), inside libavow. */
#ifndef AVOW_ANALYSIS_H
#define AVOW_ANALYSIS_H

#include <gmp.h>

#include "avow/evaluate.h"

/* Check the assumptions of a fitted model from the kept observations (data->obs):
 * equal spread between the treatment cells (Levene, Brown-Forsythe, Bartlett; on the
 * raw values when the model fits every cell mean, else on the residuals), normality of
 * the residuals (Shapiro-Wilk, skewness, excess kurtosis), unusual observations
 * (externally studentized residuals beyond 3), and, without a block, the robust one-way
 * alternatives over the cells (Welch, Kruskal-Wallis).
 * fitted: the model's fitted mean of every full cell (block * ncells + cell);
 * leverage: the leverage of an observation in each full cell (1/n with every cell mean
 * fitted). Reads res->mse and the residual row of res->anova; fills res->checks.
 * Returns AVOW_OK or AVOW_ENOMEM; a statistic that does not exist for these data is
 * recorded with its reason, not as an error. */
int eval_diagnose(const avow_plan *plan, const avow_data *data, mpq_t *fitted, const double *leverage,
                  avow_results *res);

#endif
