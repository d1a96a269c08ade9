// Metro for the web build: expo-sqlite's web worker needs its .wasm file as an asset.
const path = require('path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);
config.resolver.assetExts.push('wasm');
// Keep the server, build output, data and tests of this project out of Metro's reach.
const escape = (s) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
const own = (dir) => new RegExp('^' + escape(path.join(__dirname, dir) + path.sep) + '.*');
config.resolver.blockList = ['server', '.data', 'dist', 'tests', 'bench', '.tmp'].map(own);

module.exports = config;
