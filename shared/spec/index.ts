export * from './runSpec';
