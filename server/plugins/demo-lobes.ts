// Demo mode: procedurally generated lobes of invented bodies.
export default defineNitroPlugin(() => {
  registerDemoSeeder(seedDemoLobes)
})
