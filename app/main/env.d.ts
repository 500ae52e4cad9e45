/** `import path from 'file?asset'` (electron-vite): the built file's path at run time. */
declare module '*?asset' {
  const path: string;
  export default path;
}
