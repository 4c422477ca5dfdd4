export default function Home() {
  return (
    <main id="main">
      <h1>Epochal</h1>
      <p>Strain monitoring from survey epochs.</p>
    </main>
  );
}
