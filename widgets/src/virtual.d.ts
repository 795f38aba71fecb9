/** The engine worker bundle as text, provided by build.mjs. */
declare module 'chernel:worker-source' {
  const source: string;
  export default source;
}
