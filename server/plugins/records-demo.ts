// Demo object records join the demo team's content (seeded only when ISTHMUS_DEMO=1).
export default defineNitroPlugin(() => {
  registerDemoSeeder(seedRecordsDemo)
})
