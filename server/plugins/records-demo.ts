// Demo mode: invented object records, then the demo contact study linked to the first of them.
export default defineNitroPlugin(() => {
  registerDemoSeeder(seedRecordsDemo)
  registerDemoSeeder(seedDemoStudy)
})
