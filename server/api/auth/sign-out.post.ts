export default defineApiHandler(async (event) => {
  await endSession(event)
  return { ok: true }
})
