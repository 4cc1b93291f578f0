package freelist

import (
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
)

func TestList(t *testing.T) {
	made := 0
	l := New(2, func() *int { made++; v := made; return &v })
	a, b, c := l.Get(), l.Get(), l.Get()
	assert.Equal(t, 3, made, "an empty list makes objects")
	l.Put(a)
	l.Put(b)
	l.Put(c) // beyond the bound: dropped
	assert.Same(t, a, l.Get())
	assert.Same(t, b, l.Get())
	l.Get()
	assert.Equal(t, 4, made)
}

// TestListConcurrent: under -race, Gets and Puts from many goroutines never
// hand one object to two holders at once.
func TestListConcurrent(t *testing.T) {
	l := New(4, func() *int { return new(int) })
	var wg sync.WaitGroup
	for range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for range 1000 {
				v := l.Get()
				*v++
				*v--
				assert.Zero(t, *v)
				l.Put(v)
			}
		}()
	}
	wg.Wait()
}
