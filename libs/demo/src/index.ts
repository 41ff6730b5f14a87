// The invented demo district as plain data: the API's seed (apps/api/src/demo), the charger
// simulator, the benches and the engine's examples read it; it imports nothing but contract types.
export * from './demo-depot';
export * from './district-depots';
