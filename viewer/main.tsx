import { createRoot } from 'react-dom/client';
import * as THREE from 'three';
import { App } from './App.tsx';
import './styles.css';

// Colours in this viewer are designed as sRGB values and drawn as given (the canvas is not
// colour-managed, see GrowthView's `linear` and `flat`), so three.js must not convert them.
THREE.ColorManagement.enabled = false;

createRoot(document.getElementById('root')!).render(<App />);
