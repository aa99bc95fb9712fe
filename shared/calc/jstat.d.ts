// jstat ships no types; we use only the Student's t distribution from it.
declare module 'jstat' {
  interface StudentT {
    inv(p: number, dof: number): number;
    cdf(x: number, dof: number): number;
    pdf(x: number, dof: number): number;
  }
  interface JStatStatic {
    studentt: StudentT;
  }
  const jStat: JStatStatic;
  export default jStat;
}
