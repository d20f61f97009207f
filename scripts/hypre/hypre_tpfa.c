/* hypre_tpfa.c - the hypre half of scripts/hypre_bench.sh.
 *
 * Reads the two-point flux pressure system written by scripts/hypre/dump
 * (nx, ny, then per grid cell: diagonal, west and south couplings,
 * right-hand side, unknown flag), builds it in hypre (a structured
 * five-point matrix for PFMG, an IJ/ParCSR matrix for BoomerAMG), and
 * solves it by conjugate gradients to a relative residual of 1e-10 (two
 * norm, as floodtrace) with one V-cycle of
 *   - PFMG (semi-coarsening multigrid, Ashby and Falgout 1996): Galerkin
 *     coarse operators, symmetric red/black Gauss-Seidel, one sweep
 *     before and after;
 *   - BoomerAMG: HMIS coarsening, extended+i interpolation (at most 4
 *     entries per row), strong threshold 0.25, symmetric hybrid
 *     Gauss-Seidel;
 * as preconditioner. Prints, per method, "NAME assembly setup solve
 * iterations" in seconds. Run as an MPI singleton (no mpirun).
 *
 * Build: mpicc -O2 -o hypre_tpfa hypre_tpfa.c -lHYPRE -lm
 */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include <HYPRE.h>
#include <HYPRE_parcsr_ls.h>
#include <HYPRE_struct_ls.h>
#include <mpi.h>

static double now(void) {
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + 1e-9 * t.tv_nsec;
}

static int nx, ny;
static double *rec; /* 5 per cell */

#define D(k) rec[5 * (k)]
#define W(k) rec[5 * (k) + 1]
#define S(k) rec[5 * (k) + 2]
#define B(k) rec[5 * (k) + 3]
#define E(k) ((k) % nx + 1 < nx ? W((k) + 1) : 0.0)
#define N(k) ((k) / nx + 1 < ny ? S((k) + nx) : 0.0)

static void pfmg(void) {
	double t0 = now();
	HYPRE_StructGrid grid;
	HYPRE_Int lo[2] = {0, 0}, hi[2] = {nx - 1, ny - 1};
	HYPRE_StructGridCreate(MPI_COMM_WORLD, 2, &grid);
	HYPRE_StructGridSetExtents(grid, lo, hi);
	HYPRE_StructGridAssemble(grid);
	HYPRE_StructStencil st;
	HYPRE_Int off[5][2] = {{0, 0}, {-1, 0}, {1, 0}, {0, -1}, {0, 1}};
	HYPRE_StructStencilCreate(2, 5, &st);
	for (int e = 0; e < 5; e++) HYPRE_StructStencilSetElement(st, e, off[e]);
	HYPRE_StructMatrix A;
	HYPRE_StructMatrixCreate(MPI_COMM_WORLD, grid, st, &A);
	HYPRE_StructMatrixInitialize(A);
	long n = (long)nx * ny;
	double *v = malloc(sizeof(double) * 5 * n);
	for (long k = 0; k < n; k++) {
		v[5 * k] = D(k);
		v[5 * k + 1] = W(k);
		v[5 * k + 2] = E(k);
		v[5 * k + 3] = S(k);
		v[5 * k + 4] = N(k);
	}
	HYPRE_Int ent[5] = {0, 1, 2, 3, 4};
	HYPRE_StructMatrixSetBoxValues(A, lo, hi, 5, ent, v);
	HYPRE_StructMatrixAssemble(A);
	HYPRE_StructVector b, x;
	HYPRE_StructVectorCreate(MPI_COMM_WORLD, grid, &b);
	HYPRE_StructVectorCreate(MPI_COMM_WORLD, grid, &x);
	HYPRE_StructVectorInitialize(b);
	HYPRE_StructVectorInitialize(x);
	for (long k = 0; k < n; k++) v[k] = B(k);
	HYPRE_StructVectorSetBoxValues(b, lo, hi, v);
	for (long k = 0; k < n; k++) v[k] = 0;
	HYPRE_StructVectorSetBoxValues(x, lo, hi, v);
	HYPRE_StructVectorAssemble(b);
	HYPRE_StructVectorAssemble(x);
	double t1 = now();
	HYPRE_StructSolver cg, mg;
	HYPRE_StructPCGCreate(MPI_COMM_WORLD, &cg);
	HYPRE_StructPCGSetTol(cg, 1e-10);
	HYPRE_StructPCGSetTwoNorm(cg, 1);
	HYPRE_StructPCGSetMaxIter(cg, 500);
	HYPRE_StructPFMGCreate(MPI_COMM_WORLD, &mg);
	HYPRE_StructPFMGSetMaxIter(mg, 1);
	HYPRE_StructPFMGSetTol(mg, 0.0);
	HYPRE_StructPFMGSetZeroGuess(mg);
	HYPRE_StructPFMGSetRAPType(mg, 0);
	HYPRE_StructPFMGSetRelaxType(mg, 2);
	HYPRE_StructPFMGSetNumPreRelax(mg, 1);
	HYPRE_StructPFMGSetNumPostRelax(mg, 1);
	HYPRE_StructPCGSetPrecond(cg, HYPRE_StructPFMGSolve, HYPRE_StructPFMGSetup, mg);
	HYPRE_StructPCGSetup(cg, A, b, x);
	double t2 = now();
	HYPRE_StructPCGSolve(cg, A, b, x);
	double t3 = now();
	HYPRE_Int its;
	HYPRE_StructPCGGetNumIterations(cg, &its);
	printf("pfmg %.3f %.3f %.3f %d\n", t1 - t0, t2 - t1, t3 - t2, (int)its);
	free(v);
	HYPRE_StructPCGDestroy(cg);
	HYPRE_StructPFMGDestroy(mg);
	HYPRE_StructMatrixDestroy(A);
	HYPRE_StructVectorDestroy(b);
	HYPRE_StructVectorDestroy(x);
	HYPRE_StructStencilDestroy(st);
	HYPRE_StructGridDestroy(grid);
}

static void boomer(void) {
	double t0 = now();
	HYPRE_Int n = (HYPRE_Int)nx * ny;
	HYPRE_IJMatrix ij;
	HYPRE_IJMatrixCreate(MPI_COMM_WORLD, 0, n - 1, 0, n - 1, &ij);
	HYPRE_IJMatrixSetObjectType(ij, HYPRE_PARCSR);
	HYPRE_Int *sizes = malloc(sizeof(HYPRE_Int) * n);
	for (HYPRE_Int k = 0; k < n; k++) sizes[k] = 5;
	HYPRE_IJMatrixSetRowSizes(ij, sizes);
	HYPRE_IJMatrixInitialize(ij);
	for (HYPRE_Int k = 0; k < n; k++) {
		HYPRE_Int cols[5], nc = 0;
		double vals[5];
		if (S(k) != 0) cols[nc] = k - nx, vals[nc++] = S(k);
		if (W(k) != 0) cols[nc] = k - 1, vals[nc++] = W(k);
		cols[nc] = k, vals[nc++] = D(k);
		if (E(k) != 0) cols[nc] = k + 1, vals[nc++] = E(k);
		if (N(k) != 0) cols[nc] = k + nx, vals[nc++] = N(k);
		HYPRE_IJMatrixSetValues(ij, 1, &nc, &k, cols, vals);
	}
	HYPRE_IJMatrixAssemble(ij);
	HYPRE_ParCSRMatrix A;
	HYPRE_IJMatrixGetObject(ij, (void **)&A);
	HYPRE_IJVector ib, ix;
	HYPRE_IJVectorCreate(MPI_COMM_WORLD, 0, n - 1, &ib);
	HYPRE_IJVectorCreate(MPI_COMM_WORLD, 0, n - 1, &ix);
	HYPRE_IJVectorSetObjectType(ib, HYPRE_PARCSR);
	HYPRE_IJVectorSetObjectType(ix, HYPRE_PARCSR);
	HYPRE_IJVectorInitialize(ib);
	HYPRE_IJVectorInitialize(ix);
	HYPRE_Int *idx = malloc(sizeof(HYPRE_Int) * n);
	double *v = malloc(sizeof(double) * n);
	for (HYPRE_Int k = 0; k < n; k++) idx[k] = k, v[k] = B(k);
	HYPRE_IJVectorSetValues(ib, n, idx, v);
	for (HYPRE_Int k = 0; k < n; k++) v[k] = 0;
	HYPRE_IJVectorSetValues(ix, n, idx, v);
	HYPRE_IJVectorAssemble(ib);
	HYPRE_IJVectorAssemble(ix);
	HYPRE_ParVector b, x;
	HYPRE_IJVectorGetObject(ib, (void **)&b);
	HYPRE_IJVectorGetObject(ix, (void **)&x);
	double t1 = now();
	HYPRE_Solver cg, amg;
	HYPRE_ParCSRPCGCreate(MPI_COMM_WORLD, &cg);
	HYPRE_PCGSetTol(cg, 1e-10);
	HYPRE_PCGSetTwoNorm(cg, 1);
	HYPRE_PCGSetMaxIter(cg, 500);
	HYPRE_BoomerAMGCreate(&amg);
	HYPRE_BoomerAMGSetMaxIter(amg, 1);
	HYPRE_BoomerAMGSetTol(amg, 0.0);
	HYPRE_BoomerAMGSetCoarsenType(amg, 10);
	HYPRE_BoomerAMGSetInterpType(amg, 6);
	HYPRE_BoomerAMGSetPMaxElmts(amg, 4);
	HYPRE_BoomerAMGSetStrongThreshold(amg, 0.25);
	HYPRE_BoomerAMGSetRelaxType(amg, 6);
	HYPRE_BoomerAMGSetNumSweeps(amg, 1);
	HYPRE_BoomerAMGSetPrintLevel(amg, 0);
	HYPRE_PCGSetPrecond(cg, (HYPRE_PtrToSolverFcn)HYPRE_BoomerAMGSolve, (HYPRE_PtrToSolverFcn)HYPRE_BoomerAMGSetup, amg);
	HYPRE_ParCSRPCGSetup(cg, A, b, x);
	double t2 = now();
	HYPRE_ParCSRPCGSolve(cg, A, b, x);
	double t3 = now();
	HYPRE_Int its;
	HYPRE_PCGGetNumIterations(cg, &its);
	printf("boomeramg %.3f %.3f %.3f %d\n", t1 - t0, t2 - t1, t3 - t2, (int)its);
	free(sizes);
	free(idx);
	free(v);
	HYPRE_ParCSRPCGDestroy(cg);
	HYPRE_BoomerAMGDestroy(amg);
	HYPRE_IJMatrixDestroy(ij);
	HYPRE_IJVectorDestroy(ib);
	HYPRE_IJVectorDestroy(ix);
}

int main(int argc, char **argv) {
	MPI_Init(&argc, &argv);
	if (argc != 2) {
		fprintf(stderr, "usage: hypre_tpfa system.bin\n");
		return 2;
	}
	FILE *f = fopen(argv[1], "rb");
	int64_t dims[2];
	if (!f || fread(dims, sizeof dims, 1, f) != 1) {
		fprintf(stderr, "hypre_tpfa: cannot read %s\n", argv[1]);
		return 1;
	}
	nx = (int)dims[0], ny = (int)dims[1];
	long n = (long)nx * ny;
	rec = malloc(sizeof(double) * 5 * n);
	if (fread(rec, sizeof(double) * 5, n, f) != (size_t)n) {
		fprintf(stderr, "hypre_tpfa: %s is short\n", argv[1]);
		return 1;
	}
	fclose(f);
	HYPRE_Init();
	pfmg();
	boomer();
	HYPRE_Finalize();
	MPI_Finalize();
	return 0;
}
