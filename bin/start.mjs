#!/usr/bin/env node
// `npm start`: placeholder until the window lands; prints how to use the CLI demo.
console.log('Railwright window is not built yet. Try: npx railwright --help');
