// Package optimizer is a multi-objective genetic search: NSGA-II run as a
// Model of the eaopt genetic-algorithm library, with constrained
// domination, an archive of every non-dominated point seen, exact
// hypervolume in two and three objectives, progress reports and exact
// checkpoints.
//
// The package sees the problem only through the Problem interface: a box of
// real genes, one to three minimised objectives and any number of
// constraint violations. It knows nothing of vehicles.
//
// # Algorithm
//
// NSGA-II as in
//
//	K. Deb, A. Pratap, S. Agarwal and T. Meyarivan, "A fast and elitist
//	multiobjective genetic algorithm: NSGA-II", IEEE Transactions on
//	Evolutionary Computation 6(2):182-197, 2002, doi:10.1109/4235.996017.
//
// Each generation t of an island with N survivors P_t and N offspring Q_t:
//
//	R_t     = P_t ∪ Q_t                          (2N evaluated individuals)
//	F1, F2… = fast non-dominated sort of R_t      (Deb 2002, §III-A)
//	d_i     = crowding distance within its front (Deb 2002, §III-B)
//	P_t+1   = the first N of R_t in the crowded-comparison order
//	          (front index ascending, crowding distance descending)
//	Q_t+1   = N children of P_t+1: binary tournament on the same order,
//	          SBX crossover with probability p_c, then polynomial mutation
//	          of every gene with probability p_m
//
// The first R_0 is 2N points drawn uniformly from the box (Deb et al. draw
// N and breed the other N from them; here both halves are random, for the
// same 2N evaluations; from the first survival step on the algorithm is
// theirs).
//
// Domination is the constrained domination of
//
//	K. Deb, "An efficient constraint handling method for genetic
//	algorithms", Computer Methods in Applied Mechanics and Engineering
//	186(2-4):311-338, 2000, doi:10.1016/S0045-7825(99)00389-8:
//
// a feasible point beats an infeasible one, of two infeasible points the one
// with the smaller total violation wins, and two feasible points compare by
// Pareto domination. An evaluation that fails (an error, or a NaN or
// infinite objective) has total violation +Inf: it loses to everything that
// evaluated, and the run goes on.
//
// The variation operators are the bounded forms of simulated binary
// crossover and polynomial mutation,
//
//	K. Deb and R. B. Agrawal, "Simulated binary crossover for continuous
//	search space", Complex Systems 9(2):115-148, 1995;
//	K. Deb and D. Deb, "Analysing mutation schemes for real-parameter
//	genetic algorithms", International Journal of Artificial Intelligence
//	and Soft Computing 4(1):1-28, 2014, doi:10.1504/IJAISC.2014.059280,
//
// written out in operators.go. With Settings.Variation set to
// VariationDifferential each child is instead bred by differential
// evolution's DE/rand/1/bin from a tournament winner and two other
// survivors, then mutated the same way (differential.go; the NSGA-II-DE
// of Li & Zhang 2009): its difference vectors move all genes together,
// which follows a Pareto set that runs diagonally through the box, as a
// damper front does, in a fraction of SBX's evaluations. Survival is
// NSGA-II's either way.
//
// # How the search sits on eaopt
//
// eaopt (github.com/MaxHalford/eaopt v0.4.2) evolves Populations of
// Individuals, each carrying one scalar Fitness, through a loop of
// Model.Apply, evaluation (optionally parallel), sort by fitness, hall of
// fame and callback, with islands (NPops) and migration (MigRing, which
// swaps randomly chosen individuals between islands 0 and 1, 1 and 2, and so
// on; no wrap-around). NSGA-II ranks
// a whole population at once, so it maps onto that loop like this:
//
//   - An eaopt population holds 2N individuals: the N survivors of the last
//     survival step and their N children. The objective and violation
//     vectors live in the genome; eaopt never sees them.
//   - Model.Apply performs the survival step on all 2N (they are all
//     evaluated) and writes eaopt's Fitness from rank and crowding: the
//     survivor at position k of the crowded-comparison order gets Fitness k.
//     It then breeds N children with eaopt's SelTournament (two contestants,
//     lowest Fitness wins, which is the crowded-comparison tournament) and
//     the genome's Crossover and Mutate.
//   - eaopt then evaluates the children, in parallel when Workers > 1.
//     A child's Evaluate reports the provisional Fitness N + j (j its slot),
//     so every Fitness in a population is distinct and eaopt's unstable sort
//     has only one possible result.
//   - The callback after each generation records the generation (archive,
//     counters, progress) and re-seeds the random streams for the next one.
//
// So eaopt's own loop (GA.Minimize), parallel evaluation, islands, migrator
// and tournament selector run unchanged; nothing of eaopt is driven by hand.
//
// # Reproducibility
//
// A run is a function of the settings, the seed and the problem alone:
// serial or parallel, stepped in one call or many, interrupted and restored
// at any generation, it ends with bit-identical populations, archive and
// checkpoint bytes. eaopt draws from math/rand generators whose state cannot
// be saved, so no generator is carried through the run. Before generation t
// every island i gets a fresh generator seeded from (seed, t, i), and the
// migration step of generation t one seeded from (seed, t); the initial
// population comes from (seed, 0). The generators are PCG (math/rand/v2)
// behind the math/rand Source interface eaopt expects. eaopt's
// generation counter is set to the absolute generation at the start of each
// Step, so migration happens at the same generations however the run is
// cut. Evaluation order cannot matter: each genome is evaluated on its own
// and the problem must be pure.
//
// Restoring uses eaopt's own start-up: the genome factory given to
// eaopt's Minimize hands back the stored genomes, already evaluated, in the
// stored order, and their Evaluate returns the stored Fitness, so eaopt's
// start-up sort reproduces the order at the checkpoint.
//
// # After the last generation
//
// Search.Polish refines the archive once by a local search per point
// (polish.go: a compass search on an achievement scalarising function,
// after Sindhya, Miettinen & Deb 2013, polishsearch.go; after each failed
// poll round a step along the common descent direction that the poll
// points estimate, polishdescent.go), and CheckFront checks any front in
// decision space: each point against its twin and a few seeded neighbours
// (frontcheck.go). The stagnation rule of Settings (StagnationWindow,
// StagnationTolerance; off by default) ends a search whose hypervolume has
// stopped growing.
//
// # Hypervolume
//
// The hypervolume of a point set A against a reference point r is the
// Lebesgue measure of the region dominated by A and bounded by r,
//
//	HV(A, r) = λ( ∪_{a∈A} [a_1, r_1] × … × [a_M, r_M] ),
//
// E. Zitzler and L. Thiele, "Multiobjective evolutionary algorithms: a
// comparative case study and the strength Pareto approach", IEEE
// Transactions on Evolutionary Computation 3(4):257-271, 1999,
// doi:10.1109/4235.797969. It is computed exactly by a sweep in two
// objectives and by the dimension sweep of Beume et al. (2009) in three.
// Its unit is the product of the objectives' units.
package optimizer
