// Expo's preset for the app's code: the web build uses it by default, and jest-expo's
// transform needs it spelled out.
module.exports = function (api) {
  api.cache(true);
  return { presets: ['babel-preset-expo'] };
};
