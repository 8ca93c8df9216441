// The bessel package ships no types; these are the two functions the tests use.
declare module 'bessel' {
  export function besseli(x: number, order: number): number;
  export function besselk(x: number, order: number): number;
}
