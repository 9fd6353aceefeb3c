'use strict';
// package.json "main": lets `npx electron .` start the shell once `npm start` (main/start.mjs) has built out/electron/.
require('../out/electron/main.cjs');
