// Web app entry point (placeholder until the field-app screens land).
import { createRoot } from 'react-dom/client';

const root = document.getElementById('root');
if (!root) throw new Error('index.html has no #root element');
createRoot(root).render(<main><h1>arcfield</h1></main>);
